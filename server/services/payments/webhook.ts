import type Stripe from 'stripe';
import type { Knex } from 'knex';
import { invalid } from '../../errors';
import { enqueueOrderMail } from '../mail/order-mail';
import { transitionOrder } from '../orders/transitions';
import { withProvider, type PaymentsDeps } from './client';

// Signatures older than this are refused as replays (the provider's SDK default is the same 300 s).
const TOLERANCE_SECONDS = 300;

/** Verifies the provider's signature over the exact bytes received; a bad or stale one is a 400. */
export function verifyEvent({ stripe, config }: PaymentsDeps, rawBody: Buffer | undefined, signature: string | undefined): Stripe.Event {
  if (!rawBody || !signature) throw invalid('Missing webhook body or signature');
  try {
    return stripe.webhooks.constructEvent(rawBody, signature, config.PAYMENTS_WEBHOOK_SECRET, TOLERANCE_SECONDS);
  } catch {
    throw invalid('The webhook signature does not verify');
  }
}

type Outcome = 'processed' | 'duplicate' | 'ignored';

/**
 * Applies one verified provider event exactly once: the event id is stored in payment_events in
 * the same transaction as its effect, so a redelivery finds it and changes nothing. Events may
 * arrive in any order, so each handler only moves an order forward from the state it expects.
 */
export async function handlePaymentEvent(knex: Knex, deps: PaymentsDeps, event: Stripe.Event): Promise<Outcome> {
  return knex.transaction(async (trx) => {
    const stored = await trx('payment_events').insert({ id: event.id, type: event.type, payload: JSON.stringify(event) }).onConflict('id').ignore().returning('id');
    if (stored.length === 0) return 'duplicate';
    const object = event.data.object as unknown as Record<string, unknown>;
    const orderId = await findOrderId(trx, object);
    if (orderId === null) return 'ignored';
    const order = await trx('orders').where({ id: orderId }).forUpdate().first();
    switch (event.type) {
      case 'checkout.session.completed':
      case 'payment_intent.succeeded': {
        const intentId = event.type === 'payment_intent.succeeded' ? (object.id as string) : (object.payment_intent as string | null);
        if (event.type === 'checkout.session.completed' && object.payment_status !== 'paid') return 'ignored';
        if (order.state === 'awaiting_payment') {
          await transitionOrder(trx, orderId, 'paid', {
            message: 'Payment received', patch: { paid_at: trx.fn.now(), payment_intent_id: intentId, last_payment_error: null },
          });
          await enqueueOrderMail(trx, deps.config, orderId, 'order-received', String(orderId));
          return 'processed';
        }
        if (!order.payment_intent_id && intentId) await trx('orders').where({ id: orderId }).update({ payment_intent_id: intentId });
        const alreadyRefunded = intentId && (await trx('order_events').where({ order_id: orderId, kind: 'refunded-after-cancel' }).andWhereLike('message', `%${intentId}%`).first());
        if (order.state === 'cancelled' && intentId && !alreadyRefunded) {
          // Paid in another tab while the order was being cancelled: give the money back. If the
          // provider refuses, the transaction (and this event's record) rolls back and its retry comes again.
          const refund = await withProvider(() => deps.stripe.refunds.create(
            { payment_intent: intentId, reason: 'requested_by_customer', metadata: { order_id: String(orderId) } },
            { idempotencyKey: `refund-after-cancel-${orderId}-${intentId}` },
          ));
          await note(trx, orderId, 'refunded-after-cancel', `Payment ${intentId} arrived after the order was cancelled; refunded at once (${refund.id})`);
          return 'processed';
        }
        return 'ignored';
      }
      case 'payment_intent.payment_failed': {
        // A failure reported after the order is paid is an earlier attempt arriving late: keep it paid.
        if (order.state !== 'awaiting_payment') return 'ignored';
        const error = object.last_payment_error as { message?: string } | null;
        const message = error?.message ?? 'The payment did not go through';
        await trx('orders').where({ id: orderId }).update({ last_payment_error: message.slice(0, 300), payment_intent_id: object.id as string, updated_at: trx.fn.now() });
        await note(trx, orderId, 'payment-failed', message);
        await enqueueOrderMail(trx, deps.config, orderId, 'payment-failed', event.id, { reason: message });
        return 'processed';
      }
      case 'charge.refunded':
      case 'refund.created': {
        // Refunds we make ourselves have already moved the order; one made at the provider moves it here.
        if (order.state !== 'paid' && order.state !== 'scheduled') return 'ignored';
        await transitionOrder(trx, orderId, 'refunded', { message: 'Refunded at the payments provider' });
        await enqueueOrderMail(trx, deps.config, orderId, 'order-refunded', String(orderId));
        return 'processed';
      }
      case 'checkout.session.expired': {
        // The expired session's id stays on the order: the next checkout is keyed on it, so it gets a fresh session.
        if (order.state === 'awaiting_payment' && order.checkout_session_id === object.id) {
          await note(trx, orderId, 'checkout-expired', 'The payment page expired; the customer can start paying again');
        }
        return 'processed';
      }
      default:
        return 'ignored';
    }
  });
}

async function note(trx: Knex.Transaction, orderId: number, kind: string, message: string) {
  await trx('order_events').insert({ order_id: orderId, kind, message: message.slice(0, 1000) });
}

/** The order an event is about: our metadata first, then the provider ids we stored. */
async function findOrderId(trx: Knex.Transaction, object: Record<string, unknown>): Promise<number | null> {
  const metadata = (object.metadata ?? {}) as Record<string, string>;
  const fromMeta = Number(metadata.order_id ?? object.client_reference_id);
  if (Number.isInteger(fromMeta) && fromMeta > 0) {
    const hit = await trx('orders').where({ id: fromMeta }).first('id');
    if (hit) return hit.id;
  }
  const intent = (object.object === 'payment_intent' ? object.id : object.payment_intent) as string | undefined;
  if (intent) {
    const hit = await trx('orders').where({ payment_intent_id: intent }).first('id');
    if (hit) return hit.id;
  }
  return null;
}
