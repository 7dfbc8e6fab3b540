// The stock ledger: every change is a movement; on-hand, reserved and available are sums (part_stock view).
// A movement locks its part row (SELECT … FOR UPDATE) before reading the sums, so two concurrent
// movements on one part run one after the other and the second sees the first: neither can take
// available below zero unnoticed.
import type { Knex } from 'knex';
import type { MovementInput, ReceiveInput } from '../../../shared/schemas/catalog';
import { conflict, invalid, notFound } from '../../errors';

type Kind = MovementInput['kind'];

/** Effect of a movement of quantity q on on-hand and on reserved. */
export function movementEffect(kind: Kind, q: number): { onHand: number; reserved: number } {
  switch (kind) {
    case 'receive': case 'return': case 'adjust': return { onHand: q, reserved: 0 };
    case 'reserve': return { onHand: 0, reserved: q };
    case 'release': return { onHand: 0, reserved: -q };
    case 'consume': return { onHand: -q, reserved: 0 };
  }
}

export interface StockLevels {
  on_hand: number;
  reserved: number;
  available: number;
}

async function levels(trx: Knex.Transaction, partId: number): Promise<StockLevels> {
  return trx('part_stock').where({ part_id: partId }).first('on_hand', 'reserved', 'available');
}

/** Records one movement inside the caller's transaction, after locking the part; 409 if it would go negative. */
export async function recordMovement(trx: Knex.Transaction, partId: number, m: MovementInput, userId: number | null) {
  const part = await trx('parts').where({ id: partId }).forUpdate().first('id', 'part_number');
  if (!part) throw notFound('No such part');
  const now = await levels(trx, partId);
  const e = movementEffect(m.kind, m.quantity);
  const after = { onHand: now.on_hand + e.onHand, reserved: now.reserved + e.reserved };
  const available = after.onHand - after.reserved;
  if (after.reserved < 0) throw conflict(`${part.part_number}: only ${now.reserved} reserved, cannot release ${m.quantity}`);
  if (after.onHand < 0 || available < 0) {
    throw conflict(`${part.part_number}: ${now.available} available, this ${m.kind} of ${Math.abs(m.quantity)} would take it below zero`);
  }
  const [row] = await trx('stock_movements').insert({
    part_id: partId, kind: m.kind, quantity: m.quantity, on_hand_delta: e.onHand, reserved_delta: e.reserved,
    user_id: userId, reason: m.reason, reference: m.reference ?? '', batch_id: m.batchId ?? null, unit_id: m.unitId ?? null,
  }).returning('*');
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
    const found = await trx('parts').whereIn('id', ids).orderBy('id').forUpdate().pluck('id');
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
