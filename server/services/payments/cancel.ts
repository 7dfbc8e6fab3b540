import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { ORDER_STATE_LABELS, type OrderState } from '../../../shared/order-states';
import { conflict } from '../../errors';
import { enqueueOrderMail } from '../mail/order-mail';
import { findVisibleOrder } from '../orders/orders';
import { transitionOrder } from '../orders/transitions';
import { withProvider, type PaymentsDeps } from './client';

// Once units are being built the parts are spent: from then on a cancellation is a conversation, not a button.
const REFUNDABLE: OrderState[] = ['paid', 'scheduled'];

/**
 * Cancels an order. Awaiting payment: it simply becomes cancelled (and its payment page is closed).
 * Paid or scheduled (units not yet built): the payment is refunded through the SDK and the order
 * becomes refunded. The order row stays locked while the provider answers, so two clicks cannot
 * refund twice; if the provider refuses, the transaction rolls back and nothing changes.
 */
export async function cancelOrder(knex: Knex, { stripe, config }: PaymentsDeps, user: SessionUser, orderId: number, reason = '') {
  await findVisibleOrder(knex, user, orderId);
  return knex.transaction(async (trx) => {
    const order = await trx('orders').where({ id: orderId }).forUpdate().first();
    const who = { userId: user.id };
    if (order.state === 'awaiting_payment') {
      if (order.checkout_session_id) {
        const session = await withProvider(() => stripe.checkout.sessions.retrieve(order.checkout_session_id));
        if (session.status === 'open') await withProvider(() => stripe.checkout.sessions.expire(session.id));
        if (session.status === 'complete') throw conflict(`Order ${order.number} has just been paid: reload the page and cancel again to have it refunded`);
      }
      await transitionOrder(trx, orderId, 'cancelled', { ...who, message: reason || 'Cancelled before payment' });
      return { state: 'cancelled' as const };
    }
    if (!REFUNDABLE.includes(order.state)) {
      throw conflict(`Order ${order.number} is ${ORDER_STATE_LABELS[order.state as OrderState].toLowerCase()}: it can no longer be cancelled here. Write to the shop instead.`);
    }
    if (!order.payment_intent_id) throw conflict(`Order ${order.number} has no payment on record to refund`);
    const refund = await withProvider(() => stripe.refunds.create(
      { payment_intent: order.payment_intent_id, reason: 'requested_by_customer', metadata: { order_id: String(order.id) } },
      { idempotencyKey: `refund-order-${order.id}` },
    ));
    await transitionOrder(trx, orderId, 'refunded', { ...who, message: reason || `Cancelled and refunded (${refund.id})` });
    await enqueueOrderMail(trx, config, orderId, 'order-refunded', String(orderId), { amountCents: refund.amount });
    return { state: 'refunded' as const };
  });
}
