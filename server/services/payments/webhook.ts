import type Stripe from 'stripe';
import type { Knex } from 'knex';
import { invalid } from '../../errors';
import { enqueueOrderMail } from '../mail/order-mail';
import { issueInvoice } from '../orders/invoices';
import { transitionOrder } from '../orders/transitions';
import type { PaymentsDeps } from './client';
import { applyRefunds, recordProviderRefund, refundedCents, reportedRefundMeta, requestRefund, settleRefunds } from './refunds';
import { providerErrorDetail, shopperPaymentMessage, type ProviderPaymentError } from './shopper-messages';

// A signature's timestamp may be this far from our clock, either way: older is a replay, newer is forged or a broken clock.
export const TOLERANCE_SECONDS = 300;

/** Verifies the provider's signature over the exact bytes received; a bad, stale or future one is a 400. */
export function verifyEvent({ stripe, config }: PaymentsDeps, rawBody: Buffer | undefined, signature: string | undefined, nowSeconds = Date.now() / 1000): Stripe.Event {
  if (!rawBody || !signature) throw invalid('Missing webhook body or signature');
  const timestamp = Number(/(?:^|,)\s*t=(\d+)/.exec(signature)?.[1]);
  if (!Number.isFinite(timestamp) || Math.abs(nowSeconds - timestamp) > TOLERANCE_SECONDS) {
    throw invalid(`The webhook signature's timestamp is more than ${TOLERANCE_SECONDS / 60} minutes from now`);
  }
  try {
    return stripe.webhooks.constructEvent(rawBody, signature, config.PAYMENTS_WEBHOOK_SECRET, TOLERANCE_SECONDS);
  } catch {
    throw invalid('The webhook signature does not verify');
  }
}

type Outcome = 'processed' | 'duplicate' | 'ignored';
type Handled = { outcome: Outcome; orderId: number | null };

/**
 * Applies one verified provider event exactly once: the event id is stored in payment_events in
 * the same transaction as its effect, so a redelivery finds it and changes nothing. Events may
 * arrive in any order: payments and refunds are both recorded as facts, and the order moves when
 * the facts it needs are all there. Refunds Kneepoint owes are requested here and made after commit.
 */
export async function handlePaymentEvent(knex: Knex, deps: PaymentsDeps, event: Stripe.Event): Promise<Outcome> {
  const handled = await knex.transaction((trx) => applyEvent(trx, deps, event));
  // Also on a redelivery, so an earlier refund attempt the provider refused is tried again.
  if (handled.orderId !== null) await settleRefunds(knex, deps, handled.orderId);
  return handled.outcome;
}

async function applyEvent(trx: Knex.Transaction, deps: PaymentsDeps, event: Stripe.Event): Promise<Handled> {
  const object = event.data.object as unknown as Record<string, unknown>;
  const stored = await trx('payment_events').insert({ id: event.id, type: event.type, payload: JSON.stringify(event) }).onConflict('id').ignore().returning('id');
  if (stored.length === 0) return { outcome: 'duplicate', orderId: await findOrderId(trx, object) };
  // Refund facts are kept even when their payment is not known yet; for a known order, after its
  // row is locked (the lock order in refunds.ts).
  const refundFact = event.type === 'charge.refunded' || event.type.startsWith('refund.');
  const orderId = await findOrderId(trx, object);
  if (orderId === null) {
    if (refundFact) await recordProviderRefund(trx, event.type, object);
    return { outcome: 'ignored', orderId };
  }
  const order = await trx('orders').where({ id: orderId }).forUpdate().first();
  if (refundFact) await recordProviderRefund(trx, event.type, object);
  const done = (outcome: Outcome): Handled => ({ outcome, orderId });
  switch (event.type) {
    case 'checkout.session.completed':
    case 'payment_intent.succeeded': {
      const intentId = event.type === 'payment_intent.succeeded' ? (object.id as string) : (object.payment_intent as string | null);
      if (event.type === 'checkout.session.completed' && object.payment_status !== 'paid') return done('ignored');
      if (order.state === 'awaiting_payment') {
        await transitionOrder(trx, orderId, 'paid', {
          message: 'Payment received', patch: { paid_at: trx.fn.now(), payment_intent_id: intentId, last_payment_error: null },
        });
        // The invoice is numbered in this transaction (gap-free) and goes with the receipt.
        const invoice = await issueInvoice(trx, orderId);
        await enqueueOrderMail(trx, deps.config, orderId, 'order-received', String(orderId), { invoiceNumber: invoice.number }, [{ filename: invoice.filename, invoiceId: invoice.id }]);
        await applyRefunds(trx, deps, orderId, { message: 'Refunded at the payments provider (the refund was reported before the payment)' });
        return done('processed');
      }
      if (!order.payment_intent_id && intentId) await trx('orders').where({ id: orderId }).update({ payment_intent_id: intentId });
      if (order.state === 'cancelled' && intentId) {
        // Paid in another tab while the order was being cancelled: the money goes back (after commit).
        const paid = Number(object.amount ?? object.amount_total) || order.total_cents;
        if ((await refundedCents(trx, intentId)) >= paid) return done('ignored');
        await requestRefund(trx, { orderId, paymentIntentId: intentId, key: `refund-after-cancel-${orderId}-${intentId}`, reason: 'late-payment' });
        return done('processed');
      }
      return done('ignored');
    }
    case 'payment_intent.payment_failed': {
      // A failure reported after the order is paid is an earlier attempt arriving late: keep it paid.
      if (order.state !== 'awaiting_payment') return done('ignored');
      // Shoppers read the shop's sentence for the provider's code; staff also get what the provider said.
      const error = object.last_payment_error as (ProviderPaymentError & { message?: string }) | null;
      const reason = shopperPaymentMessage(error);
      await trx('orders').where({ id: orderId }).update({ last_payment_error: reason, payment_intent_id: object.id as string, updated_at: trx.fn.now() });
      await note(trx, orderId, 'payment-failed', `Payment did not go through: ${reason}`);
      await note(trx, orderId, 'payment-detail', providerErrorDetail(error, object.id as string));
      await enqueueOrderMail(trx, deps.config, orderId, 'payment-failed', event.id, { reason });
      return done('processed');
    }
    case 'charge.refunded':
    case 'refund.created':
    case 'refund.updated': {
      // Refunds we asked for move the order when recorded; one made at the provider moves it here.
      const moved = await applyRefunds(trx, deps, orderId, await reportedRefundMeta(trx, orderId));
      return done(moved ? 'processed' : 'ignored');
    }
    case 'checkout.session.expired': {
      // The expired session's id stays on the order: the next checkout is keyed on it, so it gets a fresh session.
      if (order.state === 'awaiting_payment' && order.checkout_session_id === object.id) {
        await note(trx, orderId, 'checkout-expired', 'The payment page expired; the customer can start paying again');
      }
      return done('processed');
    }
    default:
      return done('ignored');
  }
}

async function note(trx: Knex.Transaction, orderId: number, kind: string, message: string) {
  await trx('order_events').insert({ order_id: orderId, kind, message: message.slice(0, 1000) });
}

/** The order an event is about: our metadata first, then the provider ids we stored. */
async function findOrderId(trx: Knex.Transaction, object: Record<string, unknown>): Promise<number | null> {
  const metadata = (object.metadata ?? {}) as Record<string, string>;
  const fromMeta = Number(metadata.order_id ?? object.client_reference_id);
  if (Number.isInteger(fromMeta) && fromMeta > 0 && fromMeta <= 2_147_483_647) {
    const hit = await trx('orders').where({ id: fromMeta }).first('id');
    if (hit) return hit.id;
  }
  const intent = (object.object === 'payment_intent' ? object.id : object.payment_intent) as string | undefined;
  if (typeof intent === 'string') {
    const hit = await trx('orders').where({ payment_intent_id: intent }).first('id');
    if (hit) return hit.id;
  }
  if (object.object === 'checkout.session' && typeof object.id === 'string') {
    const hit = await trx('orders').where({ checkout_session_id: object.id }).first('id');
    if (hit) return hit.id;
  }
  return null;
}
