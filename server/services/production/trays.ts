import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { parseReadings, slotLabel, trayStats } from '../../../shared/production/trays';
import type { CreateTrayInput, TrayListQuery, TrayReadingsInput } from '../../../shared/schemas/trays';
import { conflict, invalid, notFound } from '../../errors';
import { containsPattern, paged } from '../../http/paged';
import { getSettings } from '../settings';
import { toDate } from './planning';
import { nominalVf } from './unit-circuit';

// Trays: one supplier lot of one clipping device, measured slot by slot (Vf at the shop's bench
// test current). Slots taken into units by matching (matching.ts) cannot be changed or cleared.
type Db = Knex | Knex.Transaction;

const TRAY_SORT: Record<TrayListQuery['sort'], string> = { receivedOn: 't.received_on', id: 't.id', deviceName: 'd.name', supplierLot: 't.supplier_lot' };
interface TrayListRow { id: number; device_id: number; device_name: string; kind: string; supplier_lot: string; received_on: Date; slots: number; free: number; mean_vf: number | null }

/** Trays, one page at a time, newest first; filtered by device and a search on lot or device name. */
export async function listTrays(db: Db, params: TrayListQuery) {
  const base = () => {
    const q = db('trays as t').join('devices as d', 'd.id', 't.device_id');
    if (params.deviceId) q.where('t.device_id', params.deviceId);
    if (params.q) {
      const like = containsPattern(params.q);
      const digits = params.q.replace(/^t/i, '');
      q.where((w) => {
        w.whereILike('t.supplier_lot', like).orWhereILike('d.name', like);
        if (/^\d{1,9}$/.test(digits)) w.orWhere('t.id', Number(digits));
      });
    }
    return q;
  };
  return paged(params, {
    count: base(),
    rows: base().select('t.id', 't.device_id', 'd.name as device_name', 'd.kind', 't.supplier_lot', 't.received_on',
      db.raw('(SELECT COUNT(*)::int FROM tray_slots s WHERE s.tray_id = t.id) AS slots'),
      db.raw('(SELECT COUNT(*)::int FROM tray_slots s WHERE s.tray_id = t.id AND s.unit_id IS NULL) AS free'),
      db.raw('(SELECT AVG(s.vf) FROM tray_slots s WHERE s.tray_id = t.id) AS mean_vf')),
    sortColumns: TRAY_SORT, tieBreak: 't.id',
    map: (r: TrayListRow) => ({
      id: r.id, code: `T${r.id}`, deviceId: r.device_id, deviceName: r.device_name, kind: r.kind, supplierLot: r.supplier_lot,
      receivedOn: toDate(r.received_on), slots: r.slots, free: r.free, meanVf: r.mean_vf === null ? null : Number(r.mean_vf),
    }),
  });
}

export async function createTray(knex: Knex, user: SessionUser, input: CreateTrayInput) {
  const device = await knex('devices').where({ id: input.deviceId }).first('id');
  if (!device) throw invalid('Choose a device from the library', { deviceId: 'No such device' });
  const settings = await getSettings(knex);
  const [row] = await knex('trays').insert({
    device_id: input.deviceId, supplier_lot: input.supplierLot, received_on: input.receivedOn, notes: input.notes,
    test_current_ma: settings.vf_test_current_ma, created_by: user.id,
  }).returning('id');
  return getTray(knex, row.id);
}

/** One tray with its slots (who took each), its distribution and flags. */
export async function getTray(db: Db, trayId: number) {
  const tray = await db('trays as t').join('devices as d', 'd.id', 't.device_id').leftJoin('parts as p', 'p.id', 'd.part_id')
    .where('t.id', trayId).select('t.*', 'd.name as device_name', 'd.kind', 'd.is_amps', 'd.n', 'd.rs_ohms', 'p.part_number').first();
  if (!tray) throw notFound('No such tray');
  const slots = await db('tray_slots as s').leftJoin('units as u', 'u.id', 's.unit_id').leftJoin('option_devices as od', 'od.id', 's.option_device_id')
    .where('s.tray_id', trayId).orderBy('s.slot').select('s.id', 's.slot', 's.vf', 's.unit_id', 'u.serial', 'od.side');
  const nominal = nominalVf({ is: tray.is_amps, n: tray.n, rs: tray.rs_ohms }, tray.test_current_ma);
  const stats = trayStats(slots.map((s) => ({ slot: s.slot, vf: s.vf })), tray.kind, nominal);
  const flagged = new Map(stats.outliers.map((o) => [o.slot, o.reasons]));
  return {
    tray: {
      id: tray.id, code: `T${tray.id}`, deviceId: tray.device_id, deviceName: tray.device_name, kind: tray.kind, partNumber: tray.part_number ?? null,
      supplierLot: tray.supplier_lot, receivedOn: toDate(tray.received_on), testCurrentMa: tray.test_current_ma, notes: tray.notes, createdAt: tray.created_at,
    },
    slots: slots.map((s) => ({
      id: s.id, slot: s.slot, label: slotLabel(trayId, s.slot), vf: s.vf,
      unit: s.unit_id ? { id: s.unit_id, serial: s.serial, side: s.side } : null, flags: flagged.get(s.slot) ?? [],
    })),
    stats,
  };
}

/** Saves readings slot by slot (a null reading clears the slot); slots already in a unit are 409. */
export async function saveReadings(knex: Knex, user: SessionUser, trayId: number, input: TrayReadingsInput) {
  await knex.transaction(async (trx) => {
    const tray = await trx('trays').where({ id: trayId }).forUpdate().first('id');
    if (!tray) throw notFound('No such tray');
    const slots = input.readings.map((r) => r.slot);
    const taken = await trx('tray_slots as s').join('units as u', 'u.id', 's.unit_id').where('s.tray_id', trayId).whereIn('s.slot', slots)
      .select('s.slot', 's.vf', 'u.serial');
    const changed = taken.filter((t) => input.readings.find((r) => r.slot === t.slot)?.vf !== t.vf);
    if (changed.length) {
      const list = changed.map((t) => `${slotLabel(trayId, t.slot)} (in ${t.serial})`).join(', ');
      throw conflict(`${list} ${changed.length === 1 ? 'is' : 'are'} already matched into a unit and cannot change`);
    }
    const clear = input.readings.filter((r) => r.vf === null).map((r) => r.slot);
    if (clear.length) await trx('tray_slots').where({ tray_id: trayId }).whereIn('slot', clear).whereNull('unit_id').delete();
    const rows = input.readings.filter((r) => r.vf !== null).map((r) => ({ tray_id: trayId, slot: r.slot, vf: r.vf, user_id: user.id, measured_at: trx.fn.now() }));
    if (rows.length) await trx('tray_slots').insert(rows).onConflict(['tray_id', 'slot']).merge(['vf', 'user_id', 'measured_at']);
  });
  return getTray(knex, trayId);
}

/** A meter's CSV (or any text of readings, one per line): all rows or none. */
export async function importReadings(knex: Knex, user: SessionUser, trayId: number, file: Buffer | undefined, firstSlot: number) {
  if (!file || file.length === 0) throw invalid('Choose the meter’s CSV file', { file: 'No file was uploaded' });
  const text = file.toString('utf8').replace(/^\uFEFF/, '');
  if (text.includes('\u0000') || text.includes('\uFFFD')) throw invalid('The file is not a text CSV', { file: 'Export the readings from the meter as CSV text' });
  const { readings, problems } = parseReadings(text, firstSlot);
  if (problems.length) throw invalid(`${problems.length} line${problems.length === 1 ? '' : 's'} need fixing; nothing was imported`, { file: problems.slice(0, 10).join('; ') });
  if (!readings.length) throw invalid('The file holds no readings', { file: 'Expected one reading per line' });
  const result = await saveReadings(knex, user, trayId, { readings });
  return { ...result, imported: readings.length };
}

/**
 * Puts back on their trays the devices matched to these units, for units cancelled before kitting
 * (their devices were never taken out). Called after the units are locked (LOCK_ORDER, then the
 * tray slots, as matching does); returns how many slots are free again.
 */
export async function returnMatchedSlots(trx: Knex.Transaction, unitIds: number[]): Promise<number> {
  if (unitIds.length === 0) return 0;
  return trx('tray_slots').whereIn('unit_id', unitIds).update({ unit_id: null, option_device_id: null });
}
