import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { ORDER_STATE_LABELS, type OrderState } from '../../../shared/order-states';
import { conflict } from '../../errors';
import { findVisibleOrder } from '../orders/orders';
import { transitionOrder } from '../orders/transitions';
import { withProvider, type PaymentsDeps } from './client';
import { requestRefund, settleRefunds } from './refunds';

// Once units are being built the parts are spent: from then on a cancellation is a conversation, not a button.
const REFUNDABLE: OrderState[] = ['paid', 'scheduled'];

const noLongerCancellable = (order: { number: string; state: OrderState }) =>
  conflict(`Order ${order.number} is ${ORDER_STATE_LABELS[order.state].toLowerCase()}: it can no longer be cancelled here. Write to the shop instead.`);

/**
 * Cancels an order. Awaiting payment: its payment page is closed at the provider first, then the
 * order becomes cancelled. Paid or scheduled (units not yet built): a refund request is committed,
 * the provider refunds it (no row lock held meanwhile), and the order becomes refunded. A provider
 * refusal leaves the order as it was (502); cancelling again retries the same request.
 */
export async function cancelOrder(knex: Knex, deps: PaymentsDeps, user: SessionUser, orderId: number, reason = '') {
  const seen = await findVisibleOrder(knex, user, orderId);
  const who = { userId: user.id };
  if (seen.state === 'awaiting_payment') {
    if (seen.checkout_session_id) {
      const session = await withProvider(() => deps.stripe.checkout.sessions.retrieve(seen.checkout_session_id as string));
      if (session.status === 'complete') throw conflict(`Order ${seen.number} has just been paid: reload the page and cancel again to have it refunded`);
      if (session.status === 'open') await withProvider(() => deps.stripe.checkout.sessions.expire(session.id));
    }
    return knex.transaction(async (trx) => {
      const order = await trx('orders').where({ id: orderId }).forUpdate().first();
      // Paid between the look and the lock: the payment event won; cancelling again refunds it.
      if (order.state !== 'awaiting_payment') throw conflict(`Order ${order.number} has just been paid: reload the page and cancel again to have it refunded`);
      await transitionOrder(trx, orderId, 'cancelled', { ...who, message: reason || 'Cancelled before payment' });
      return { state: 'cancelled' as const };
    });
  }
  await knex.transaction(async (trx) => {
    const order = await trx('orders').where({ id: orderId }).forUpdate().first();
    if (!REFUNDABLE.includes(order.state)) throw noLongerCancellable(order);
    if (!order.payment_intent_id) throw conflict(`Order ${order.number} has no payment on record to refund`);
    await requestRefund(trx, { orderId, paymentIntentId: order.payment_intent_id, key: `refund-order-${orderId}`, reason: 'cancelled', message: reason, userId: user.id });
  });
  await settleRefunds(knex, deps, orderId);
  const after = await knex('orders').where({ id: orderId }).first('state', 'number');
  if (after.state !== 'refunded') {
    const refunded = await knex('refund_requests').where({ idempotency_key: `refund-order-${orderId}`, status: 'done' }).first('id');
    if (refunded) throw conflict(`Order ${after.number} was refunded, but it moved on while the refund was made: the shop has a note to look at it`);
    throw noLongerCancellable(after);
  }
  return { state: 'refunded' as const };
}
