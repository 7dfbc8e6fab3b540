import type { Knex } from 'knex';
import { conflict } from '../../errors';
import { appendMovements, batchHoldings, lockParts, type Movement } from '../stock/ledger';
import { unitEvent, lockUnitWithBatch, transitionUnit } from './history';
import { lockBatch } from './planning';
import { partsPerUnit } from './requirements';
import { returnMatchedSlots } from './trays';

// Kitting, reserving and cancelling through the one stock ledger (server/services/stock/ledger.ts),
// in its lock order: the batch, then the unit, then the parts in id order. With the batch locked no
// other planner action or kit of the same batch runs at the same time; with the parts locked no
// other batch moves the same parts, so available never goes negative.

async function lockPartsAvailable(trx: Knex.Transaction, partIds: number[]) {
  const balances = await lockParts(trx, partIds);
  return new Map<number, number>([...balances].map(([id, b]) => [id, b.available]));
}

async function batchReservations(trx: Knex.Transaction, batchId: number) {
  return new Map<number, number>([...(await batchHoldings(trx, batchId))].map(([id, h]) => [id, h.reserved]));
}

const LIVE_BATCH = ['released', 'on_bench'];

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
    if (!LIVE_BATCH.includes(batch.state)) throw conflict('Only a released batch can reserve stock');
    const need = await openNeeds(trx, batch);
    const available = await lockPartsAvailable(trx, [...need.keys()]);
    const held = await batchReservations(trx, batchId);
    let stillShort = 0;
    const movements: Movement[] = [];
    for (const [partId, q] of [...need].sort((a, b) => a[0] - b[0])) {
      const want = q - (held.get(partId) ?? 0);
      if (want <= 0) continue;
      const take = Math.min(want, Math.max(0, available.get(partId) ?? 0));
      stillShort += want - take;
      if (take > 0) movements.push({ partId, kind: 'reserve', quantity: take, userId, batchId, reason: 'reserved for the batch' });
    }
    await appendMovements(trx, movements);
    return { reserved: movements.reduce((a, m) => a + m.quantity, 0), stillShort };
  });
}

/** Kits one unit: consumes its parts, from the batch's reservation first, then from free stock. All or nothing. */
export async function kitUnit(trx: Knex.Transaction, userId: number, unitId: number) {
  const { unit, batch } = await lockUnitWithBatch(trx, unitId);
  if (unit.kitted_at) throw conflict(`Unit ${unit.serial} is already kitted`);
  if (unit.state === 'cancelled') throw conflict(`Unit ${unit.serial} is cancelled`);
  if (!LIVE_BATCH.includes(batch.state)) throw conflict(`Unit ${unit.serial}: its batch is no longer released`);
  const need = (await partsPerUnit(trx, batch.revision_id, [unit.option_id])).get(unit.option_id)!;
  const available = await lockPartsAvailable(trx, [...need.keys()]);
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
  await appendMovements(trx, plan.map((p) => ({
    partId: p.partId, kind: 'consume' as const, quantity: p.q, onHandDelta: -p.q, reservedDelta: -p.fromReservation,
    userId, batchId: unit.batch_id, unitId: unit.id, reason: `kitted ${unit.serial}`,
  })));
  await trx('units').where({ id: unit.id }).update({ kitted_at: trx.fn.now(), updated_at: trx.fn.now() });
  await unitEvent(trx, unit.id, 'kitted', 'parts taken from stock', userId);
}

/** Kits every open unit of a batch that stock allows, in serial order; the rest stay waiting (partial kitting). */
export async function kitBatch(knex: Knex, userId: number, batchId: number) {
  const unitIds: number[] = await knex('units').where({ batch_id: batchId }).whereNull('kitted_at').whereNot('state', 'cancelled').orderBy('sequence').pluck('id');
  const batch = await knex('batches').where({ id: batchId }).first();
  if (!batch || !LIVE_BATCH.includes(batch.state)) throw conflict('Only a released batch can be kitted');
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
    const { unit, batch } = await lockUnitWithBatch(trx, unitId);
    await transitionUnit(trx, unit, 'cancelled', userId, reason);
    if (!unit.kitted_at) {
      const need = (await partsPerUnit(trx, batch.revision_id, [unit.option_id])).get(unit.option_id)!;
      await lockParts(trx, [...need.keys()]);
      const held = await batchReservations(trx, unit.batch_id);
      // Keep what the remaining open units still need; release only the surplus.
      const stillNeeded = await openNeeds(trx, batch);
      const releases: Movement[] = [];
      for (const [partId] of [...need].sort((a, b) => a[0] - b[0])) {
        const surplus = (held.get(partId) ?? 0) - (stillNeeded.get(partId) ?? 0);
        if (surplus > 0) releases.push({ partId, kind: 'release', quantity: surplus, userId, batchId: unit.batch_id, unitId: unit.id, reason: `unit ${unit.serial} cancelled` });
      }
      await appendMovements(trx, releases);
      // Devices matched from a tray were never picked: they go back to their slots.
      await returnMatchedSlots(trx, [unit.id]);
    }
    return { id: unit.id, state: unit.state };
  });
}
