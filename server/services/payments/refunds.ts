// Refunds, in two halves that never overlap a provider call with a row lock:
//  - what the provider reports (payment_refunds, keyed by the provider's ids), applied to the order
//    whenever both the payment and enough refund are known, whatever order the events came in;
//  - what Kneepoint asks for (refund_requests): written and committed first, then the provider is
//    called with an idempotency key of the request, then the result is written in a second
//    transaction. A retry (a second click, a redelivered event) repeats the same request safely.
// Lock order: a transaction that writes an order's payment or refund rows locks the order row
// first (cancel, webhook events, the result of a refund call), so two of them never wait on each
// other's rows in opposite orders. A second click's request would otherwise hold the order while
// waiting for the first click's refund row, and the first click's result wait for the order.
import type { Knex } from 'knex';
import { enqueueOrderMail } from '../mail/order-mail';
import { issueCreditNote } from '../orders/invoices';
import { transitionOrder } from '../orders/transitions';
import { withProvider, type PaymentsDeps } from './client';

type Db = Knex | Knex.Transaction;

/** Records a refund event's facts by the provider's id; a repeat changes nothing. */
export async function recordProviderRefund(trx: Db, type: string, object: Record<string, unknown>) {
  const intent = typeof object.payment_intent === 'string' ? object.payment_intent : null;
  const id = typeof object.id === 'string' ? object.id : null;
  if (!intent || !id) return;
  if (type === 'refund.created' || type === 'refund.updated') {
    if (object.status === 'failed' || object.status === 'canceled') return;
    await trx('payment_refunds').insert({ id, kind: 'refund', payment_intent_id: intent, amount_cents: Number(object.amount) || 0 }).onConflict('id').ignore();
  } else if (type === 'charge.refunded') {
    // A charge reports its running total: keep the largest seen, so an older snapshot never lowers it.
    await trx.raw(
      `INSERT INTO payment_refunds (id, kind, payment_intent_id, amount_cents) VALUES (?, 'charge', ?, ?)
       ON CONFLICT (id) DO UPDATE SET amount_cents = GREATEST(payment_refunds.amount_cents, EXCLUDED.amount_cents)`,
      [id, intent, Number(object.amount_refunded) || 0],
    );
  }
}

/** How much of a payment the provider says it has refunded. */
export async function refundedCents(trx: Db, paymentIntentId: string): Promise<number> {
  const { rows } = await trx.raw(
    `SELECT GREATEST(COALESCE(SUM(amount_cents) FILTER (WHERE kind = 'refund'), 0),
                     COALESCE(MAX(amount_cents) FILTER (WHERE kind = 'charge'), 0))::int AS cents
       FROM payment_refunds WHERE payment_intent_id = ?`,
    [paymentIntentId],
  );
  return rows[0].cents;
}

/**
 * Moves a paid (or scheduled) order to refunded once its payment is refunded in full, and queues
 * the refund mail once. Called after every payment or refund fact, so the order of events is moot.
 */
export async function applyRefunds(trx: Knex.Transaction, { config }: PaymentsDeps, orderId: number, meta: { userId?: number | null; message: string }) {
  const order = await trx('orders').where({ id: orderId }).forUpdate().first();
  if (!order?.payment_intent_id || (order.state !== 'paid' && order.state !== 'scheduled')) return false;
  const refunded = await refundedCents(trx, order.payment_intent_id);
  if (refunded < order.total_cents) return false;
  await transitionOrder(trx, orderId, 'refunded', meta);
  // A full refund credits the invoice in full: a numbered credit note, attached to the refund mail.
  const note = await issueCreditNote(trx, orderId, `order-refunded:${orderId}`);
  await enqueueOrderMail(trx, config, orderId, 'order-refunded', String(orderId), { amountCents: refunded, creditNoteNumber: note.number }, [{ filename: note.filename, invoiceId: note.id }]);
  return true;
}

export type RefundReason = 'cancelled' | 'late-payment';

/** The history line of an order refunded because it was cancelled: the canceller's words, or ours. */
const cancelledMeta = (request: { user_id: number | null; message: string }) => ({ userId: request.user_id, message: request.message || 'Cancelled and refunded' });

/**
 * How the history names a refund the provider reports for this order: when Kneepoint asked for it
 * (a cancellation), the same line as if the refund call's own result had moved the order, so the
 * history does not depend on whether the provider's event or that result comes first.
 */
export async function reportedRefundMeta(trx: Db, orderId: number): Promise<{ userId?: number | null; message: string }> {
  const asked = await trx('refund_requests').where({ order_id: orderId, reason: 'cancelled' }).orderBy('id', 'desc').first('user_id', 'message');
  return asked ? cancelledMeta(asked) : { message: 'Refunded at the payments provider' };
}

interface RefundRequest {
  id: number;
  order_id: number;
  payment_intent_id: string;
  idempotency_key: string;
  reason: RefundReason;
  message: string;
  user_id: number | null;
  status: 'pending' | 'done' | 'failed';
  attempts: number;
}

/** Writes (or re-opens a failed) refund request inside the caller's transaction; the call comes after commit. */
export async function requestRefund(trx: Knex.Transaction, input: { orderId: number; paymentIntentId: string; key: string; reason: RefundReason; message?: string; userId?: number | null }) {
  await trx('refund_requests').insert({
    order_id: input.orderId, payment_intent_id: input.paymentIntentId, idempotency_key: input.key,
    reason: input.reason, message: input.message ?? '', user_id: input.userId ?? null,
  }).onConflict('idempotency_key').ignore();
  await trx('refund_requests').where({ idempotency_key: input.key, status: 'failed' }).update({ status: 'pending', updated_at: trx.fn.now() });
}

/**
 * Calls the provider for one pending request (outside any transaction), then records the result.
 * Each attempt has its own idempotency key: a retried attempt is replayed by the provider, and a
 * new attempt after a refund that did go through is refused by the provider (nothing left to refund).
 */
async function executeRefund(knex: Knex, deps: PaymentsDeps, request: RefundRequest) {
  let refund;
  try {
    refund = await withProvider(() => deps.stripe.refunds.create(
      { payment_intent: request.payment_intent_id, reason: 'requested_by_customer', metadata: { order_id: String(request.order_id) } },
      { idempotencyKey: `${request.idempotency_key}-attempt-${request.attempts}` },
    ));
  } catch (error) {
    // A customer's cancellation is retried by cancelling again; a late payment's by its next event.
    await knex('refund_requests').where({ id: request.id, status: 'pending' }).update({
      status: request.reason === 'cancelled' ? 'failed' : 'pending', attempts: request.attempts + 1,
      last_error: String((error as Error).message).slice(0, 1000), updated_at: knex.fn.now(),
    });
    throw error;
  }
  await knex.transaction(async (trx) => {
    await trx('orders').where({ id: request.order_id }).forUpdate().first('id');
    await recordProviderRefund(trx, 'refund.created', refund as unknown as Record<string, unknown>);
    const done = await trx('refund_requests').where({ id: request.id, status: 'pending' })
      .update({ status: 'done', refund_id: refund.id, last_error: null, updated_at: trx.fn.now() }).returning('id');
    if (done.length === 0) return; // another attempt recorded it first
    // The provider's ids go only into a staff-only row (STAFF_ONLY_EVENT_KINDS); customers read plain words.
    await trx('order_events').insert({ order_id: request.order_id, kind: 'payment-detail', message: `Refund ${refund.id} of payment ${request.payment_intent_id}` });
    if (request.reason === 'late-payment') {
      await trx('order_events').insert({
        order_id: request.order_id, kind: 'refunded-after-cancel',
        message: 'A payment arrived after the order was cancelled and was refunded at once',
      });
    }
    const moved = await applyRefunds(trx, deps, request.order_id, cancelledMeta(request));
    if (!moved && request.reason === 'cancelled') {
      // The order moved on (e.g. into production) while the provider answered: the money is back, so say so for staff.
      const order = await trx('orders').where({ id: request.order_id }).first('state');
      if (order.state !== 'refunded') {
        await trx('order_events').insert({ order_id: request.order_id, kind: 'refund-needs-attention', message: `Refunded at the provider while the order became ${order.state}` });
      }
    }
  });
}

/** Carries out an order's pending refund requests (none pending: nothing to do). */
export async function settleRefunds(knex: Knex, deps: PaymentsDeps, orderId: number) {
  const pending: RefundRequest[] = await knex('refund_requests').where({ order_id: orderId, status: 'pending' }).orderBy('id');
  for (const request of pending) await executeRefund(knex, deps, request);
}
