// Catalog movements (deliveries, returns, count corrections, manual reservations) through the one
// stock ledger (server/services/stock/ledger.ts), which owns the lock order and the balance.
// A movement locks what it names in that order (batch, unit, then the part) before reading the
// balance, so two concurrent movements on one part run one after the other and the second sees
// the first: neither can take available below zero unnoticed.
import type { Knex } from 'knex';
import type { MovementInput, ReceiveInput } from '../../../shared/schemas/catalog';
import { conflict, invalid, notFound } from '../../errors';
import { appendMovements, batchHoldings, lockBatchRow, lockParts, lockUnitRows, movementEffect } from '../stock/ledger';

/** Records one movement inside the caller's transaction, after locking the part; 409 if it would go negative. */
export async function recordMovement(trx: Knex.Transaction, partId: number, m: MovementInput, userId: number | null) {
  if (m.batchId) {
    const found = await lockBatchRow(trx, m.batchId).catch((e: { status?: number }) => { if (e.status === 404) return null; throw e; });
    if (!found) throw invalid('The movement names a batch that does not exist', { batchId: 'No such batch' });
  }
  if (m.unitId && !(await lockUnitRows(trx, [m.unitId])).length) throw invalid('The movement names a unit that does not exist', { unitId: 'No such unit' });
  const now = (await lockParts(trx, [partId])).get(partId);
  if (!now) throw notFound('No such part');
  const e = movementEffect(m.kind, m.quantity);
  const after = { onHand: now.onHand + e.onHand, reserved: now.reserved + e.reserved };
  const available = after.onHand - after.reserved;
  if (after.reserved < 0) throw conflict(`${now.partNumber}: only ${now.reserved} reserved, cannot release ${m.quantity}`);
  if (m.kind === 'release' && m.batchId) {
    // A release named for a batch gives back that batch's reservation, not another batch's.
    const held = (await batchHoldings(trx, m.batchId, [partId])).get(partId)?.reserved ?? 0;
    if (held < m.quantity) throw conflict(`${now.partNumber}: the batch holds ${held} reserved, cannot release ${m.quantity}`);
  }
  if (after.onHand < 0 || available < 0) {
    throw conflict(`${now.partNumber}: ${now.available} available, this ${m.kind} of ${Math.abs(m.quantity)} would take it below zero`);
  }
  const [row] = await appendMovements(trx, [{
    partId, kind: m.kind, quantity: m.quantity, userId, reason: m.reason, reference: m.reference ?? '', batchId: m.batchId ?? null, unitId: m.unitId ?? null,
  }]);
  return { movement: row, stock: { on_hand: after.onHand, reserved: after.reserved, available } };
}

/** POST /api/parts/:id/movements. */
export async function addMovement(knex: Knex, partId: number, m: MovementInput, userId: number) {
  return knex.transaction((trx) => recordMovement(trx, partId, m, userId));
}

/** Receive a supplier delivery: several lines, all or nothing. Parts are locked in id order (no deadlocks). */
export async function receiveDelivery(knex: Knex, input: ReceiveInput, userId: number) {
  const ids = input.lines.map((l) => l.partId);
  if (new Set(ids).size !== ids.length) {
    const fields: Record<string, string> = {};
    ids.forEach((id, i) => { if (ids.indexOf(id) !== i) fields[`lines.${i}.partId`] = 'This part is already on the delivery'; });
    throw invalid('Each part once per delivery', fields);
  }
  return knex.transaction(async (trx) => {
    const supplier = await trx('suppliers').where({ id: input.supplierId }).first('name');
    if (!supplier) throw invalid('Choose the supplier', { supplierId: 'No such supplier' });
    const found = [...(await lockParts(trx, ids)).keys()];
    const missing = input.lines.findIndex((l) => !found.includes(l.partId));
    if (missing >= 0) throw invalid('A line names a part that does not exist', { [`lines.${missing}.partId`]: 'No such part' });
    const movements = [];
    for (const line of [...input.lines].sort((a, b) => a.partId - b.partId)) {
      const r = await recordMovement(trx, line.partId, { kind: 'receive', quantity: line.quantity, reason: `Delivery from ${supplier.name}`, reference: input.reference }, userId);
      movements.push(r.movement);
    }
    return { received: movements.length, units: input.lines.reduce((a, l) => a + l.quantity, 0), movements };
  });
}

/** Movement history of one part (newest first) or of all parts, for the page and the CSV export. */
export async function movementHistory(knex: Knex, partId?: number, limit = 500) {
  return knex('stock_movements as m').join('parts as p', 'p.id', 'm.part_id').leftJoin('users as u', 'u.id', 'm.user_id')
    .modify((q) => { if (partId) q.where('m.part_id', partId); })
    .orderBy([{ column: 'm.created_at', order: 'desc' }, { column: 'm.id', order: 'desc' }]).limit(limit)
    .select('m.id', 'm.created_at', 'p.part_number', 'm.kind', 'm.quantity', 'm.on_hand_delta', 'm.reserved_delta', 'm.reason', 'm.reference', 'm.batch_id', 'm.unit_id', 'u.name as user_name');
}
