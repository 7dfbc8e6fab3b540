// The device library: engine presets (seeded) plus custom devices from SPICE parameters or from
// two or three datasheet points fitted by the engine; each can be linked to the part stocked for it.
import type { Knex } from 'knex';
import { EngineInputError, checkDevice, fitDevice } from '../../../shared/engine/index';
import type { CustomDeviceInput } from '../../../shared/schemas/catalog';
import { invalid, isUniqueViolation, notFound } from '../../errors';
import { deviceView, type DeviceRow } from './options-data';

const COLS = ['d.id', 'd.name', 'd.kind', 'd.preset_key', 'd.is_amps', 'd.n', 'd.rs_ohms', 'd.eg_ev', 'd.xti', 'd.part_id', 'd.provenance', 'd.fit_points', 'p.part_number', 'p.unit_cost_cents', 's.available'];

// eslint-disable-next-line @typescript-eslint/no-explicit-any
function view(r: any) {
  return { ...deviceView(r as DeviceRow), provenance: r.provenance as string, fitPoints: r.fit_points, partNumber: r.part_number ?? null, unitCostCents: r.unit_cost_cents ?? null, available: r.available ?? null };
}

const query = (knex: Knex) => knex('devices as d').leftJoin('parts as p', 'p.id', 'd.part_id').leftJoin('part_stock as s', 's.part_id', 'd.part_id');

export async function listDevices(knex: Knex) {
  return (await query(knex).orderByRaw('d.preset_key IS NULL, d.kind, d.name').select(COLS)).map(view);
}

export async function getDevice(knex: Knex, id: number) {
  const r = await query(knex).where('d.id', id).first(COLS);
  if (!r) throw notFound('No such device');
  return view(r);
}

async function checkPart(knex: Knex, partId: number | null) {
  if (partId && !(await knex('parts').where({ id: partId }).first('id'))) throw invalid('Choose a part from the list', { partId: 'No such part' });
}

/** POST /api/devices: from SPICE parameters, or fitted from datasheet points (IS and N from two, RS from a third). */
export async function createDevice(knex: Knex, input: CustomDeviceInput) {
  await checkPart(knex, input.partId);
  let model: { is: number; n: number; rs: number };
  let provenance = input.provenance;
  let fitPoints: { vf: number; current: number }[] | null = null;
  try {
    if (input.source === 'datasheet') {
      fitPoints = input.points!.map((p) => ({ vf: p.vf, current: p.currentMa / 1000 }));
      model = fitDevice(fitPoints) as { is: number; n: number; rs: number };
      provenance ||= `Fitted from ${fitPoints.length} datasheet points: ${fitPoints.map((p) => `${p.vf} V at ${p.current * 1000} mA`).join(', ')}.`;
    } else {
      model = checkDevice({ is: input.is!, n: input.n!, rs: input.rs }) as { is: number; n: number; rs: number };
      provenance ||= 'Entered as SPICE parameters.';
    }
  } catch (e) {
    if (e instanceof EngineInputError) {
      const field = e.path.startsWith('points') ? 'points' : e.path.replace(/^device\./, '');
      throw invalid('The device parameters do not work', { [field]: e.message });
    }
    throw e;
  }
  try {
    const [row] = await knex('devices').insert({
      name: input.name, kind: input.kind, is_amps: model.is, n: model.n, rs_ohms: model.rs, provenance,
      fit_points: fitPoints ? JSON.stringify(fitPoints) : null, part_id: input.partId,
    }).returning('id');
    return getDevice(knex, row.id);
  } catch (e) {
    if (isUniqueViolation(e)) throw invalid('That name is taken', { name: `${input.name} already exists` });
    throw e;
  }
}

/** PATCH /api/devices/:id/part: link (or unlink, null) the stocked part. */
export async function linkDevicePart(knex: Knex, id: number, partId: number | null) {
  await checkPart(knex, partId);
  const n = await knex('devices').where({ id }).update({ part_id: partId });
  if (n === 0) throw notFound('No such device');
  return getDevice(knex, id);
}
