import type { Knex } from 'knex';
import { conflict } from '../../errors';
import { unitEvent, lockUnit, transitionUnit } from './history';
import { lockBatch } from './planning';
import { partsPerUnit } from './requirements';

// Kitting through the stock ledger. Every writer locks the parts rows it touches FOR UPDATE in
// part-id order first (so two batches never deadlock), then reads available from part_stock:
// with the rows locked no other kitting can move the same parts, so available never goes negative.

async function lockParts(trx: Knex.Transaction, partIds: number[]) {
  const ids = [...new Set(partIds)].sort((a, b) => a - b);
  if (ids.length) await trx('parts').whereIn('id', ids).orderBy('id').forUpdate().select('id');
  const rows = ids.length ? await trx('part_stock').whereIn('part_id', ids).select('part_id', 'available') : [];
  return new Map<number, number>(rows.map((r: { part_id: number; available: number }) => [r.part_id, Number(r.available)]));
}

async function batchReservations(trx: Knex.Transaction, batchId: number) {
  const rows = (await trx('stock_movements').where({ batch_id: batchId }).select('part_id').sum({ r: 'reserved_delta' }).groupBy('part_id')) as unknown as { part_id: number; r: string }[];
  return new Map<number, number>(rows.map((r: { part_id: number; r: string }) => [r.part_id, Number(r.r)]));
}

/** Needs of the open, not yet kitted units of a batch, per part. */
async function openNeeds(trx: Knex.Transaction, batch: { id: number; revision_id: number }) {
  const units = (await trx('units').where({ batch_id: batch.id }).whereNull('kitted_at').whereNot('state', 'cancelled').select('option_id').count({ n: '*' }).groupBy('option_id')) as unknown as { option_id: number; n: string }[];
  const per = await partsPerUnit(trx, batch.revision_id, units.map((u: { option_id: number }) => u.option_id));
  const need = new Map<number, number>();
  for (const u of units as { option_id: number; n: string }[]) {
    for (const [partId, q] of per.get(u.option_id) ?? []) need.set(partId, (need.get(partId) ?? 0) + q * Number(u.n));
  }
  return need;
}

/** Reserves what is available towards a released batch's open needs; partial when stock is short. */
export async function reserveForBatch(knex: Knex, userId: number, batchId: number) {
  return knex.transaction(async (trx) => {
    const batch = await lockBatch(trx, batchId);
    if (!['released', 'on_bench'].includes(batch.state)) throw conflict('Only a released batch can reserve stock');
    const need = await openNeeds(trx, batch);
    const available = await lockParts(trx, [...need.keys()]);
    const held = await batchReservations(trx, batchId);
    let reserved = 0;
    let stillShort = 0;
    for (const [partId, q] of [...need].sort((a, b) => a[0] - b[0])) {
      const want = q - (held.get(partId) ?? 0);
      if (want <= 0) continue;
      const take = Math.min(want, Math.max(0, available.get(partId) ?? 0));
      stillShort += want - take;
      if (take <= 0) continue;
      await trx('stock_movements').insert({ part_id: partId, kind: 'reserve', quantity: take, on_hand_delta: 0, reserved_delta: take, user_id: userId, batch_id: batchId, reason: 'reserved for the batch' });
      reserved += take;
    }
    return { reserved, stillShort };
  });
}

/** Kits one unit: consumes its parts, from the batch's reservation first, then from free stock. All or nothing. */
export async function kitUnit(trx: Knex.Transaction, userId: number, unitId: number) {
  const unit = await lockUnit(trx, unitId);
  if (unit.kitted_at) throw conflict(`Unit ${unit.serial} is already kitted`);
  if (unit.state === 'cancelled') throw conflict(`Unit ${unit.serial} is cancelled`);
  const batch = await trx('batches').where({ id: unit.batch_id }).first();
  const need = (await partsPerUnit(trx, batch.revision_id, [unit.option_id])).get(unit.option_id)!;
  const available = await lockParts(trx, [...need.keys()]);
  const held = await batchReservations(trx, unit.batch_id);
  const plan = [...need].sort((a, b) => a[0] - b[0]).map(([partId, q]) => {
    const fromReservation = Math.min(q, Math.max(0, held.get(partId) ?? 0));
    return { partId, q, fromReservation, fromFree: q - fromReservation };
  });
  const short = plan.filter((p) => p.fromFree > (available.get(p.partId) ?? 0));
  if (short.length) {
    const names = await trx('parts').whereIn('id', short.map((s) => s.partId)).pluck('part_number');
    throw conflict(`Not enough stock to kit ${unit.serial}: short of ${names.join(', ')}`);
  }
  for (const p of plan) {
    await trx('stock_movements').insert({ part_id: p.partId, kind: 'consume', quantity: p.q, on_hand_delta: -p.q, reserved_delta: -p.fromReservation, user_id: userId, batch_id: unit.batch_id, unit_id: unit.id, reason: `kitted ${unit.serial}` });
  }
  await trx('units').where({ id: unit.id }).update({ kitted_at: trx.fn.now(), updated_at: trx.fn.now() });
  await unitEvent(trx, unit.id, 'kitted', 'parts taken from stock', userId);
}

/** Kits every open unit of a batch that stock allows, in serial order; the rest stay waiting (partial kitting). */
export async function kitBatch(knex: Knex, userId: number, batchId: number) {
  const unitIds: number[] = await knex('units').where({ batch_id: batchId }).whereNull('kitted_at').whereNot('state', 'cancelled').orderBy('sequence').pluck('id');
  const batch = await knex('batches').where({ id: batchId }).first();
  if (!batch || !['released', 'on_bench'].includes(batch.state)) throw conflict('Only a released batch can be kitted');
  let kitted = 0;
  const short: string[] = [];
  for (const id of unitIds) {
    try {
      await knex.transaction((trx) => kitUnit(trx, userId, id));
      kitted += 1;
    } catch (error) {
      if ((error as { status?: number }).status !== 409) throw error;
      short.push((error as Error).message);
    }
  }
  return { kitted, notKitted: short.length, firstProblem: short[0] ?? null };
}

/** Cancels a unit that is not yet built; its share of the batch's reservation goes back to free stock. */
export async function cancelUnit(knex: Knex, userId: number, unitId: number, reason: string) {
  return knex.transaction(async (trx) => {
    const unit = await lockUnit(trx, unitId);
    await transitionUnit(trx, unit, 'cancelled', userId, reason);
    if (!unit.kitted_at) {
      const batch = await trx('batches').where({ id: unit.batch_id }).first();
      const need = (await partsPerUnit(trx, batch.revision_id, [unit.option_id])).get(unit.option_id)!;
      await lockParts(trx, [...need.keys()]);
      const held = await batchReservations(trx, unit.batch_id);
      // Keep what the remaining open units still need; release only the surplus.
      const stillNeeded = await openNeeds(trx, batch);
      for (const [partId] of [...need].sort((a, b) => a[0] - b[0])) {
        const surplus = (held.get(partId) ?? 0) - (stillNeeded.get(partId) ?? 0);
        if (surplus > 0) await trx('stock_movements').insert({ part_id: partId, kind: 'release', quantity: surplus, on_hand_delta: 0, reserved_delta: -surplus, user_id: userId, batch_id: unit.batch_id, unit_id: unit.id, reason: `unit ${unit.serial} cancelled` });
      }
    }
    return { id: unit.id, state: unit.state };
  });
}
