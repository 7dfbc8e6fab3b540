import type { Knex } from 'knex';
import { ORDER_STATE_LABELS, ORDER_TRANSITIONS, type OrderState } from '../../../shared/order-states';
import { conflict, notFound } from '../../errors';

/**
 * Moves an order to a new state inside the caller's transaction, after locking it, and records
 * the change in its history. An illegal change throws a 409. Returns the order row as updated.
 * Cancelling a paid order is a refund (`refunded`), done through the payments service.
 */
export async function transitionOrder(
  trx: Knex.Transaction,
  orderId: number,
  to: OrderState,
  meta: { userId?: number | null; message?: string; patch?: Record<string, unknown> } = {},
) {
  const order = await trx('orders').where({ id: orderId }).forUpdate().first();
  if (!order) throw notFound('No such order');
  const from = order.state as OrderState;
  if (!ORDER_TRANSITIONS[from].includes(to)) {
    throw conflict(`Order ${order.number} is ${ORDER_STATE_LABELS[from].toLowerCase()}: it cannot become ${ORDER_STATE_LABELS[to].toLowerCase()}`);
  }
  const [updated] = await trx('orders')
    .where({ id: orderId })
    .update({ ...meta.patch, state: to, updated_at: trx.fn.now() })
    .returning('*');
  await trx('order_events').insert({
    order_id: orderId, kind: 'state-change', from_state: from, to_state: to,
    message: meta.message ?? '', user_id: meta.userId ?? null,
  });
  return updated;
}
