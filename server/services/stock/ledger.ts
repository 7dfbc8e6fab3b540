// The stock ledger: the one writer of `stock_movements` and of the per-part balance beside it.
//
// THE LOCK ORDER. Every transaction that touches stock takes its row locks in this order, and
// nowhere else decides it:
//
//   1. the batch       (one batch per transaction)           lockBatchRow
//   2. its units       (ascending id, all in one statement)  lockUnitRows
//   3. the parts       (ascending id, all in one statement)  lockParts
//
// A step may be skipped, never taken backwards: kitting, reserving, cancelling a unit or a batch,
// assigning builds, starting a build, a bench test and a catalog movement all go batch → units →
// parts. Orders (transitionOrder) are locked after these; the one exception is shipping (and taking
// finished stock), which starts from the order and then locks batches and units that are past
// building, which no stock action waits for. Batch and unit locks are FOR NO KEY UPDATE, so the
// foreign-key checks of rows that merely point at them (movements, unit events, sheet jobs) never wait.
// The part row guards its `part_balances` row: whoever holds the part lock may read the balance
// and append movements. `assertLockOrder` below refuses a lock taken out of order at run time,
// so a new code path that would deadlock fails its first test instead of one request in a thousand.
//
// The balance (`part_balances`) is updated in the same statement sequence as each movement, so it
// always equals the sum of the ledger; `compareBalances` proves it and `npm run stock:check` reports.
import type { Knex } from 'knex';
import { conflict, notFound } from '../../errors';

export const LOCK_ORDER = ['batch', 'units', 'parts'] as const;
export type LockLevel = (typeof LOCK_ORDER)[number];

export type MovementKind = 'receive' | 'return' | 'adjust' | 'reserve' | 'release' | 'consume';

const highest = new WeakMap<object, number>();

/** Throws (a programming error, not a user error) when a lock would be taken against LOCK_ORDER. */
export function assertLockOrder(trx: Knex.Transaction, level: LockLevel) {
  const rank = LOCK_ORDER.indexOf(level);
  const top = highest.get(trx) ?? -1;
  if (top > rank) throw new Error(`Lock order broken: ${level} locked after ${LOCK_ORDER[top]} (the order is ${LOCK_ORDER.join(' → ')})`);
  highest.set(trx, rank);
}

/** Locks one batch row for the rest of the transaction; 404 when it does not exist. */
export async function lockBatchRow(trx: Knex.Transaction, batchId: number) {
  assertLockOrder(trx, 'batch');
  const batch = await trx('batches').where({ id: batchId }).forNoKeyUpdate().first();
  if (!batch) throw notFound('No such batch');
  return batch;
}

/** Locks unit rows in ascending id order; returns the rows found (by id), missing ids are left out. */
export async function lockUnitRows(trx: Knex.Transaction, unitIds: number[]) {
  assertLockOrder(trx, 'units');
  const ids = [...new Set(unitIds)].sort((a, b) => a - b);
  if (!ids.length) return [];
  return trx('units').whereIn('id', ids).orderBy('id').forNoKeyUpdate().select('*');
}

export interface Balance { onHand: number; reserved: number; available: number }

/** Locks part rows in ascending id order and returns their balances (0 for a part that never moved). */
export async function lockParts(trx: Knex.Transaction, partIds: number[]): Promise<Map<number, Balance & { partNumber: string }>> {
  assertLockOrder(trx, 'parts');
  const ids = [...new Set(partIds)].sort((a, b) => a - b);
  if (!ids.length) return new Map();
  // Lock first, then read the balances in a statement of their own. In one locking statement with
  // the join, a transaction that waited for the lock would get the part row as it is now but the
  // balance row as it was before the waiting began (PostgreSQL re-checks only the locked table's
  // rows), and so plan with stock another transaction has just taken.
  await trx('parts').whereIn('id', ids).orderBy('id').forNoKeyUpdate().select('id');
  const rows = await trx('parts as p').leftJoin('part_balances as b', 'b.part_id', 'p.id').whereIn('p.id', ids)
    .orderBy('p.id').select('p.id', 'p.part_number', 'b.on_hand', 'b.reserved');
  return new Map(rows.map((r: { id: number; part_number: string; on_hand: number | null; reserved: number | null }) => {
    const onHand = r.on_hand ?? 0;
    const reserved = r.reserved ?? 0;
    return [r.id, { partNumber: r.part_number, onHand, reserved, available: onHand - reserved }];
  }));
}

/** Effect of a movement of quantity q on on-hand and on reserved. */
export function movementEffect(kind: MovementKind, q: number): { onHand: number; reserved: number } {
  switch (kind) {
    case 'receive': case 'return': case 'adjust': return { onHand: q, reserved: 0 };
    case 'reserve': return { onHand: 0, reserved: q };
    case 'release': return { onHand: 0, reserved: -q };
    case 'consume': return { onHand: -q, reserved: 0 };
  }
}

export interface Movement {
  partId: number;
  kind: MovementKind;
  quantity: number;
  /** Defaults to movementEffect(kind, quantity); a kit sets both (consume from the reservation). */
  onHandDelta?: number;
  reservedDelta?: number;
  reason: string;
  reference?: string;
  batchId?: number | null;
  unitId?: number | null;
  userId?: number | null;
  createdAt?: Date;
}

/**
 * Appends movements and moves the balances with them, in the caller's transaction. Locks the
 * parts (id order) if the caller has not; 409 when a part would end with negative on-hand,
 * negative reserved or reserved above on-hand, so nothing is written.
 */
export async function appendMovements(trx: Knex.Transaction, movements: Movement[]) {
  if (!movements.length) return [];
  const before = await lockParts(trx, movements.map((m) => m.partId));
  const missing = movements.find((m) => !before.has(m.partId));
  if (missing) throw notFound('No such part');
  const rows = movements.map((m) => {
    const e = movementEffect(m.kind, m.quantity);
    return {
      part_id: m.partId, kind: m.kind, quantity: m.quantity,
      on_hand_delta: m.onHandDelta ?? e.onHand, reserved_delta: m.reservedDelta ?? e.reserved,
      user_id: m.userId ?? null, reason: m.reason, reference: m.reference ?? '', batch_id: m.batchId ?? null, unit_id: m.unitId ?? null,
      ...(m.createdAt ? { created_at: m.createdAt } : {}),
    };
  });
  const delta = new Map<number, { onHand: number; reserved: number }>();
  for (const r of rows) {
    const d = delta.get(r.part_id) ?? { onHand: 0, reserved: 0 };
    d.onHand += r.on_hand_delta;
    d.reserved += r.reserved_delta;
    delta.set(r.part_id, d);
  }
  for (const [partId, d] of delta) {
    const b = before.get(partId)!;
    const onHand = b.onHand + d.onHand;
    const reserved = b.reserved + d.reserved;
    if (onHand < 0 || reserved < 0 || onHand - reserved < 0) {
      throw conflict(`${b.partNumber}: ${b.available} available (${b.onHand} on hand, ${b.reserved} reserved): these movements would take it below zero`);
    }
  }
  const inserted = [];
  for (let i = 0; i < rows.length; i += 500) inserted.push(...(await trx('stock_movements').insert(rows.slice(i, i + 500)).returning('*')));
  const upserts = [...delta].sort((a, b) => a[0] - b[0]).map(([partId, d]) => ({ part_id: partId, on_hand: d.onHand, reserved: d.reserved }));
  await trx('part_balances').insert(upserts).onConflict('part_id').merge({
    on_hand: trx.raw('part_balances.on_hand + excluded.on_hand'),
    reserved: trx.raw('part_balances.reserved + excluded.reserved'),
    updated_at: trx.fn.now(),
  });
  return inserted;
}

/** What batches hold per part: net reservation and what their kits consumed (one query for all). */
export async function batchHoldingsMany(db: Knex | Knex.Transaction, batchIds: number[], partIds?: number[]) {
  const rows = (await db('stock_movements').whereIn('batch_id', batchIds)
    .modify((q) => { if (partIds) q.whereIn('part_id', partIds); })
    .select('batch_id', 'part_id').sum({ reserved: 'reserved_delta' })
    .select(db.raw(`COALESCE(SUM(CASE WHEN kind = 'consume' THEN quantity ELSE 0 END), 0)::int AS consumed`))
    .groupBy('batch_id', 'part_id').orderBy(['batch_id', 'part_id'])) as unknown as { batch_id: number; part_id: number; reserved: string; consumed: number }[];
  return rows.map((r) => ({ batch_id: r.batch_id, part_id: r.part_id, reserved: Number(r.reserved), consumed: Number(r.consumed) }));
}

/** What one batch holds per part. */
export async function batchHoldings(db: Knex | Knex.Transaction, batchId: number, partIds?: number[]) {
  return new Map((await batchHoldingsMany(db, [batchId], partIds)).map((r) => [r.part_id, { reserved: r.reserved, consumed: r.consumed }]));
}

export interface BalanceDifference { partId: number; partNumber: string; balance: { onHand: number; reserved: number }; ledger: { onHand: number; reserved: number } }

/** Every part whose stored balance differs from the sum of its movements (empty when all agree). */
export async function compareBalances(db: Knex | Knex.Transaction, partIds?: number[]): Promise<BalanceDifference[]> {
  const only = partIds ? 'AND p.id = ANY(?::int[])' : '';
  const { rows } = await db.raw(`
    SELECT p.id, p.part_number,
           COALESCE(b.on_hand, 0)::int AS b_on_hand, COALESCE(b.reserved, 0)::int AS b_reserved,
           COALESCE(l.on_hand, 0)::int AS l_on_hand, COALESCE(l.reserved, 0)::int AS l_reserved
      FROM parts p
      LEFT JOIN part_balances b ON b.part_id = p.id
      LEFT JOIN (SELECT part_id, SUM(on_hand_delta) AS on_hand, SUM(reserved_delta) AS reserved
                   FROM stock_movements GROUP BY part_id) l ON l.part_id = p.id
     WHERE (COALESCE(b.on_hand, 0) <> COALESCE(l.on_hand, 0) OR COALESCE(b.reserved, 0) <> COALESCE(l.reserved, 0)) ${only}
     ORDER BY p.id`, partIds ? [partIds] : []);
  return rows.map((r: { id: number; part_number: string; b_on_hand: number; b_reserved: number; l_on_hand: number; l_reserved: number }) => ({
    partId: r.id, partNumber: r.part_number,
    balance: { onHand: r.b_on_hand, reserved: r.b_reserved }, ledger: { onHand: r.l_on_hand, reserved: r.l_reserved },
  }));
}

/**
 * Sets every balance to the sum of its ledger (the ledger is the truth). For bulk loaders that
 * write movements with plain inserts (a generated dataset), and the repair after a check failed.
 */
export async function rebuildBalances(knex: Knex) {
  return knex.transaction(async (trx) => {
    await trx.raw('LOCK TABLE part_balances IN EXCLUSIVE MODE');
    await trx.raw(`
      INSERT INTO part_balances (part_id, on_hand, reserved, updated_at)
      SELECT p.id, COALESCE(SUM(m.on_hand_delta), 0)::int, COALESCE(SUM(m.reserved_delta), 0)::int, now()
        FROM parts p LEFT JOIN stock_movements m ON m.part_id = p.id GROUP BY p.id
      ON CONFLICT (part_id) DO UPDATE SET on_hand = excluded.on_hand, reserved = excluded.reserved, updated_at = now()`);
  });
}
