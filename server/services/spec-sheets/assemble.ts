// Gathers one unit's spec sheet data from stored rows only, so the same unit gives the same sheet.
import type { Knex } from 'knex';
import { forwardVoltage, type MeasuredForwardVoltages } from '../../../shared/engine';
import { optionCircuit } from '../../../shared/catalog/circuit';
import { batchLabel } from '../../../shared/production/serials';
import { notFound } from '../../errors';
import type { SpecSheetData } from '../../pdf/spec-sheet-data';
import { driveOf, loadStrings, type RevisionRow } from '../catalog/options-data';
import { shopFormatter } from '../format';
import { getSettings, type ShopSettings } from '../settings';
import { cachedNominalBand } from './band-cache';
import { compute } from '../../compute/pool';
import { SPEC_SHEET_LAYOUT } from '../../../templates/pdf/spec-sheet-layout';

type Db = Knex | Knex.Transaction;

export const SHEET_STATES = ['passed', 'in_stock', 'shipped'] as const;

/**
 * Where the public verification page lives, e.g. http://127.0.0.1:3000/verify/HM-B0007-012K?c=…,
 * with the unit's random code when it has one (units made before codes existed have none).
 */
export function verifyUrl(publicUrl: string, serial: string, code?: string | null) {
  const url = `${publicUrl.replace(/\/$/, '')}/verify/${encodeURIComponent(serial)}`;
  return code ? `${url}?c=${encodeURIComponent(code)}` : url;
}

/** The public address the server answers on: PUBLIC_URL, else loopback on PORT (as server/config.ts). */
export function defaultPublicUrl(env: NodeJS.ProcessEnv = process.env) {
  return env.PUBLIC_URL ?? `http://127.0.0.1:${env.PORT ?? 3000}`;
}

/** "Juno Abara" → "J. A." when the shop prints initials. */
export function staffName(name: string | null | undefined, style: ShopSettings['sheet_staff_names']) {
  if (!name) return '—';
  if (style === 'names') return name;
  return name.split(/\s+/).filter(Boolean).map((part) => `${part[0].toUpperCase()}.`).join(' ');
}

/** The address setting without the name and e-mail it may repeat, since the sheet prints those beside it. */
function postalAddress(s: ShopSettings) {
  return s.shop_address.split('·').map((part) => part.trim()).filter((part) => part && part !== s.shop_name && part !== s.shop_email).join(' · ');
}

/** The device column is narrow: "Silicon small-signal (1N4148 type)" prints as "Silicon small-signal". */
export function sheetDeviceName(name: string) {
  return name.length > 24 ? name.replace(/\s*\([^)]*\)\s*$/, '') : name;
}

/** "2 (Quieter board)", or just "2" when the label would not fit on the model's line beside the model name. */
export function revisionText(modelName: string, revision: { number: number; label: string }) {
  const full = `${revision.number} (${revision.label})`;
  return revision.label && `${modelName}, revision ${full}`.length <= 44 ? full : String(revision.number);
}

/** A day in the shop's time zone, e.g. "28 Nov 2026". */
export function shopDay(at: Date | null | undefined, settings: ShopSettings) {
  if (!at) return null;
  return shopFormatter(settings).date(at);
}

/** The unit row with what the sheet and the access rules need; 404 for an unknown serial. */
export async function unitBySerial(db: Db, serial: string) {
  const unit = await db('units as u').join('batches as b', 'b.id', 'u.batch_id').leftJoin('orders as o', 'o.id', 'u.order_id')
    .where('u.serial', serial).first('u.*', 'b.number as batch_number', 'b.revision_id', 'o.customer_id');
  if (!unit) throw notFound(`No unit with serial ${serial}`);
  return unit as { id: number; serial: string; state: string; option_id: number; batch_id: number; batch_number: number; revision_id: number; customer_id: number | null; assembler_id: number | null };
}

/** Everything a unit's sheet prints, from the unit's stored rows (settings read now). */
export async function sheetDataForUnit(db: Db, unitId: number, publicUrl = defaultPublicUrl()): Promise<SpecSheetData> {
  const settings = await getSettings(db);
  const unit = await db('units as u').join('batches as b', 'b.id', 'u.batch_id').leftJoin('users as a', 'a.id', 'u.assembler_id')
    .where('u.id', unitId).first('u.*', 'b.number as batch_number', 'b.revision_id', 'a.name as assembler_name');
  if (!unit) throw notFound('No such unit');
  const revision = (await db('model_revisions').where({ id: unit.revision_id }).first()) as RevisionRow;
  const model = await db('models').where({ id: revision.model_id }).first('name');
  const option = await db('clipping_options').where({ id: unit.option_id }).first();
  const strings = (await loadStrings(db, [option.id])).get(option.id)!;
  const slots = await db('option_devices').where({ option_id: option.id }).orderBy(['side', 'position']).select('id', 'side', 'position');
  const readings = new Map<number, { measured_vf: number; test_current_ma: number }>(
    (await db('unit_devices').where({ unit_id: unitId }).select('option_device_id', 'measured_vf', 'test_current_ma')).map((r) => [r.option_device_id, r]),
  );
  const test = await db('test_records as t').leftJoin('users as u', 'u.id', 't.tester_id').where('t.unit_id', unitId)
    .orderBy([{ column: 't.created_at', order: 'desc' }, { column: 't.id', order: 'desc' }]).first('t.*', 'u.name as tester_name');
  const built = await db('unit_events').where({ unit_id: unitId, kind: 'state-change', to_state: 'built' }).orderBy('created_at', 'desc').first('created_at');

  const drive = driveOf(revision);
  const spec = optionCircuit(drive, { topology: option.topology, network: option.network, positive: strings.positive, negative: strings.negative });
  // The bench current the readings were taken at (they share one); the setting when none were taken.
  const testCurrentMa = readings.size > 0 ? [...readings.values()][0].test_current_ma : settings.vf_test_current_ma;
  const testCurrentA = testCurrentMa / 1000;
  const devices = (['positive', 'negative'] as const).flatMap((side) => slots.filter((s) => s.side === side).map((slot, i) => {
    const device = strings[side][i];
    const reading = readings.get(slot.id);
    return { side, position: slot.position as number, name: sheetDeviceName(device.name), nominalVf: forwardVoltage(device, testCurrentA), measuredVf: reading ? reading.measured_vf : null };
  }));
  // A device without a reading keeps its nominal Vf, so the recompute refits only what was measured.
  const measured: MeasuredForwardVoltages | null = readings.size === 0 ? null : {
    testCurrentA,
    positive: devices.filter((d) => d.side === 'positive').map((d) => d.measuredVf ?? d.nominalVf),
    negative: devices.filter((d) => d.side === 'negative').map((d) => d.measuredVf ?? d.nominalVf),
  };
  const profile = await compute.specSheetProfile({ spec, measured, band: await cachedNominalBand(db, spec) });
  const reference = profile.points.find((p) => p.label === 'Reference') ?? profile.points[0];
  const testedAt: Date | null = test ? test.created_at : null;

  return {
    paper: settings.paper_size === 'Letter' ? 'Letter' : 'A4',
    shop: { name: settings.shop_name, address: postalAddress(settings), email: settings.shop_email },
    unit: {
      serial: unit.serial, model: model.name, revision: revisionText(model.name, revision),
      batch: batchLabel(unit.batch_number), builtOn: shopDay(built?.created_at, settings), testedOn: shopDay(testedAt, settings),
      assembler: staffName(unit.assembler_name, settings.sheet_staff_names), tester: staffName(test?.tester_name, settings.sheet_staff_names),
    },
    option: { name: option.name, topology: option.topology, description: option.description },
    devices,
    testCurrentMa,
    profile,
    qa: test ? {
      currentDrawMa: test.current_draw_ma, measuredThdPercent: test.measured_thd_percent,
      measuredHarmonicsDbc: test.measured_harmonics ? (test.measured_harmonics as { order: number; dbc: number }[]).filter((h) => h.order <= SPEC_SHEET_LAYOUT.harmonicsInTable).map((h) => h.dbc) : null,
      measuredThdRPercent: test.measured_thd_r_percent,
      predictedThdPercent: test.predicted_thd_percent ?? reference.thdF * 100,
      tolerancePercent: test.tolerance_percent,
      verdict: test.outcome === 'pass' ? 'passed' : 'failed',
    } : null,
    power: { supplyV: revision.supply_v, currentMa: test ? test.current_draw_ma : null },
    verifyUrl: verifyUrl(publicUrl, unit.serial, unit.verify_code),
    // Fixed to the test (or the unit's creation), so the same unit renders the same document.
    issuedAt: testedAt ?? unit.created_at,
  };
}
