import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { isVfOutOfRange } from '../../../shared/production/forward-voltage';
import { slotLabel } from '../../../shared/production/trays';
import type { AcceptMatchInput, MatchProposalInput } from '../../../shared/schemas/trays';
import { compute } from '../../compute/pool';
import { conflict, invalid, notFound } from '../../errors';
import { getSettings } from '../settings';
import { lockBatchRow, lockUnitRows } from '../stock/ledger';
import { unitEvent } from './history';
import { circuitFor, optionDevices, predictUnit } from './unit-circuit';

// Matching a released batch's units to measured tray slots: the proposal (planBatchMatching in
// shared/matching/batch.ts, run in the compute pool) and accepting it (slots taken, each unit's
// measured Vf filled in from its slots and its predicted profile recomputed).
type Db = Knex | Knex.Transaction;

/** Batch states whose units may still get their devices matched. */
const MATCHABLE_BATCH = ['released', 'on_bench'];
/** Unit states that have not been built yet. */
const MATCHABLE_UNIT = ['waiting', 'building', 'rework'];

async function matchableBatch(db: Db, batchId: number) {
  const batch = await db('batches').where({ id: batchId }).first();
  if (!batch) throw notFound('No such batch');
  return batch;
}

function assertBatchOpen(batch: { state: string; number: number }) {
  if (!MATCHABLE_BATCH.includes(batch.state)) throw conflict(`Devices are matched once the batch is released and before it closes (it is ${batch.state.replace('_', ' ')})`);
}

/** Proposes which free tray slots go into which of the batch's unmatched units, with what that gains. */
export async function proposeMatching(db: Db, batchId: number, input: MatchProposalInput) {
  const batch = await matchableBatch(db, batchId);
  assertBatchOpen(batch);
  const settings = await getSettings(db);
  const units = await db('units as u').join('clipping_options as c', 'c.id', 'u.option_id').where('u.batch_id', batchId).whereIn('u.state', MATCHABLE_UNIT)
    .whereNotExists(db('tray_slots as s').whereRaw('s.unit_id = u.id'))
    .orderBy('u.sequence').select('u.id', 'u.serial', 'u.option_id', 'c.name as option_name', 'c.code as option_code');
  const optionIds = [...new Set(units.map((u) => u.option_id as number))];
  const options = await Promise.all(optionIds.map(async (optionId) => {
    const { spec, devices } = await circuitFor(db, batch.revision_id, optionId);
    return {
      optionId, spec,
      devices: devices.map((d) => ({ optionDeviceId: d.id, side: d.side, position: d.position, deviceId: d.deviceId, model: d.model })),
      unitIds: units.filter((u) => u.option_id === optionId).map((u) => u.id as number),
    };
  }));
  const deviceIds = [...new Set(options.flatMap((o) => o.devices.map((d) => d.deviceId)))];
  const slotsQuery = db('tray_slots as s').join('trays as t', 't.id', 's.tray_id').join('devices as d', 'd.id', 't.device_id')
    .whereNull('s.unit_id').whereIn('t.device_id', deviceIds.length ? deviceIds : [0])
    .select('s.id', 's.tray_id', 's.slot', 's.vf', 't.device_id', 'd.name as device_name');
  if (input.trayIds.length) slotsQuery.whereIn('t.id', input.trayIds);
  const slots = await slotsQuery;
  const slotById = new Map(slots.map((s) => [String(s.id), s]));
  const plan = await compute.batchMatching({
    options, testCurrentA: settings.vf_test_current_ma / 1000,
    pools: deviceIds.map((deviceId) => ({ deviceId, readings: slots.filter((s) => s.device_id === deviceId).map((s) => ({ id: String(s.id), vf: s.vf })) })),
  });
  const unitById = new Map(units.map((u) => [u.id as number, u]));
  const describe = (readingId: string) => {
    const s = slotById.get(readingId)!;
    return { slotId: s.id as number, label: slotLabel(s.tray_id, s.slot), vf: s.vf as number, deviceName: s.device_name as string };
  };
  const deviceSides = new Map(options.flatMap((o) => o.devices.map((d) => [d.optionDeviceId, d.side])));
  return {
    batchId,
    options: plan.options.map((o) => ({ ...o, optionName: units.find((u) => u.option_id === o.optionId)?.option_name as string, optionCode: units.find((u) => u.option_id === o.optionId)?.option_code as string })),
    units: plan.units.map((p) => ({
      unitId: p.unitId, serial: unitById.get(p.unitId)!.serial as string, optionCode: unitById.get(p.unitId)!.option_code as string, mismatchMv: p.mismatchMv, h2Dbc: p.h2Dbc,
      slots: p.slots.map((s) => ({ optionDeviceId: s.optionDeviceId, side: deviceSides.get(s.optionDeviceId)!, ...describe(s.readingId) })),
    })),
    unmatched: plan.unmatched.map((u) => ({ unitId: u.unitId, serial: unitById.get(u.unitId)!.serial as string, reason: u.reason })),
    leftovers: plan.leftovers.flatMap((l) => l.readingIds.map(describe)).sort((a, b) => a.label.localeCompare(b.label, 'en', { numeric: true })),
  };
}

/**
 * Accepts a proposal (or the planner's edit of it): each slot goes into its unit's device position,
 * the unit's measured Vf is filled in from the tray (the assembler may still change it), and its
 * predicted profile is recomputed from those readings. Locks: the batch, then its units (the stock
 * ledger's LOCK_ORDER), then the tray slots.
 */
export async function acceptMatching(knex: Knex, user: SessionUser, batchId: number, input: AcceptMatchInput) {
  const batch = await matchableBatch(knex, batchId);
  const fields: Record<string, string> = {};
  const seenUnits = new Set<number>();
  const seenSlots = new Set<number>();
  input.units.forEach((u, i) => {
    if (seenUnits.has(u.unitId)) fields[`units.${i}.unitId`] = 'This unit is listed twice';
    seenUnits.add(u.unitId);
    u.slots.forEach((s, j) => {
      if (seenSlots.has(s.slotId)) fields[`units.${i}.slots.${j}.slotId`] = 'This slot is used twice';
      seenSlots.add(s.slotId);
    });
  });
  if (Object.keys(fields).length) throw invalid('Each unit and each slot may appear once', fields);
  const settings = await getSettings(knex);
  // Slots and option devices read first (for the predictions, which run outside the transaction);
  // the transaction checks again under lock that nothing changed in between.
  const slots = await knex('tray_slots as s').join('trays as t', 't.id', 's.tray_id').join('devices as d', 'd.id', 't.device_id').whereIn('s.id', [...seenSlots])
    .select('s.id', 's.tray_id', 's.slot', 's.vf', 's.unit_id', 't.device_id', 't.test_current_ma', 'd.kind');
  const slotById = new Map(slots.map((s) => [s.id as number, s]));
  const units = await knex('units').whereIn('id', [...seenUnits]).select('id', 'serial', 'batch_id', 'option_id');
  const unitById = new Map(units.map((u) => [u.id as number, u]));
  const devicesByOption = new Map<number, Awaited<ReturnType<typeof optionDevices>>>();
  for (const optionId of new Set(units.map((u) => u.option_id as number))) devicesByOption.set(optionId, await optionDevices(knex, optionId));
  input.units.forEach((u, i) => {
    const unit = unitById.get(u.unitId);
    if (!unit || unit.batch_id !== batchId) { fields[`units.${i}.unitId`] = 'Not a unit of this batch'; return; }
    const devices = devicesByOption.get(unit.option_id)!;
    const covered = new Set<number>();
    u.slots.forEach((s, j) => {
      const device = devices.find((d) => d.id === s.optionDeviceId);
      const slot = slotById.get(s.slotId);
      if (!device) fields[`units.${i}.slots.${j}.optionDeviceId`] = `Not a device position of ${unit.serial}`;
      else if (!slot) fields[`units.${i}.slots.${j}.slotId`] = 'No such tray slot';
      else if (slot.device_id !== device.deviceId) fields[`units.${i}.slots.${j}.slotId`] = `${slotLabel(slot.tray_id, slot.slot)} holds another device than ${device.name}`;
      else covered.add(device.id);
    });
    if (!fields[`units.${i}.unitId`] && covered.size !== devices.length && !Object.keys(fields).some((f) => f.startsWith(`units.${i}.`))) {
      fields[`units.${i}.slots`] = `${unit.serial} needs one slot for each of its ${devices.length} devices`;
    }
  });
  if (Object.keys(fields).length) throw invalid('Check the slots chosen for each unit', fields);
  assertBatchOpen(batch);

  const predictions = new Map<number, Awaited<ReturnType<typeof predictUnit>>>();
  for (const u of input.units) {
    const measured = new Map(u.slots.map((s) => [s.optionDeviceId, slotById.get(s.slotId)!.vf as number]));
    predictions.set(u.unitId, await predictUnit(knex, batch.revision_id, unitById.get(u.unitId)!.option_id, measured, settings.vf_test_current_ma));
  }

  return knex.transaction(async (trx) => {
    const locked = await lockBatchRow(trx, batchId);
    assertBatchOpen(locked);
    const lockedUnits = await lockUnitRows(trx, [...seenUnits]);
    for (const unit of lockedUnits) {
      if (!MATCHABLE_UNIT.includes(unit.state)) throw conflict(`Unit ${unit.serial} is ${unit.state}: its devices are already fitted`);
    }
    const already = await trx('tray_slots').whereIn('unit_id', [...seenUnits]).first('unit_id');
    if (already) throw conflict(`Unit ${unitById.get(already.unit_id)!.serial} already has devices from a tray`);
    const current = await trx('tray_slots').whereIn('id', [...seenSlots]).orderBy('id').forUpdate().select('id', 'tray_id', 'slot', 'vf', 'unit_id');
    for (const s of current) {
      if (s.unit_id !== null) throw conflict(`${slotLabel(s.tray_id, s.slot)} was taken by another unit: propose again`);
      if (s.vf !== slotById.get(s.id)!.vf) throw conflict(`${slotLabel(s.tray_id, s.slot)} was measured again meanwhile: propose again`);
    }
    if (current.length !== seenSlots.size) throw conflict('A tray slot was cleared meanwhile: propose again');
    for (const u of input.units) {
      const unit = unitById.get(u.unitId)!;
      const labels: string[] = [];
      for (const s of u.slots) {
        const slot = slotById.get(s.slotId)!;
        await trx('tray_slots').where({ id: s.slotId }).update({ unit_id: u.unitId, option_device_id: s.optionDeviceId });
        await trx('unit_devices').insert({
          unit_id: u.unitId, option_device_id: s.optionDeviceId, measured_vf: slot.vf, test_current_ma: slot.test_current_ma,
          out_of_range: isVfOutOfRange(slot.kind, slot.vf), user_id: user.id, measured_at: trx.fn.now(),
        }).onConflict(['unit_id', 'option_device_id']).merge();
        const side = devicesByOption.get(unit.option_id)!.find((d) => d.id === s.optionDeviceId)!.side;
        labels.push(`${slotLabel(slot.tray_id, slot.slot)} (${side}, ${slot.vf.toFixed(4)} V)`);
      }
      const predicted = predictions.get(u.unitId)!;
      await trx('units').where({ id: u.unitId }).update({ predicted: JSON.stringify(predicted), updated_at: trx.fn.now() });
      await unitEvent(trx, u.unitId, 'devices', `matched from trays: ${labels.join(', ')}; predicted THD ${predicted.thdPercent.toFixed(2)} %`, user.id);
    }
    return { batchId, matched: input.units.length };
  });
}

/** The tray slots fitted in each of these units, for kit lists and checklists: unit id → option device id → label. */
export async function slotLabelsFor(db: Db, unitIds: number[]) {
  const rows = unitIds.length ? await db('tray_slots').whereIn('unit_id', unitIds).orderBy(['unit_id', 'option_device_id']).select('unit_id', 'option_device_id', 'tray_id', 'slot', 'vf') : [];
  const out = new Map<number, Map<number, { label: string; vf: number }>>();
  for (const r of rows) {
    if (!out.has(r.unit_id)) out.set(r.unit_id, new Map());
    out.get(r.unit_id)!.set(r.option_device_id, { label: slotLabel(r.tray_id, r.slot), vf: r.vf });
  }
  return out;
}
