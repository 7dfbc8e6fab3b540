// POST /v1/refunds: refund all or part of a paid payment intent (or charge).
// Refunds succeed at once here; `refund.created` and `charge.refunded` go out.
import type { FakeContext } from './context.js';
import { ApiError, invalid, noSuch } from './errors.js';
import type { FormObject } from './form.js';
import { metadata, optInt, optString } from './params.js';
import { type Refund, newId, now } from './store.js';

const REASONS = ['duplicate', 'fraudulent', 'requested_by_customer'];

function money(amount: number, currency: string): string {
  return `${(amount / 100).toFixed(2)} ${currency.toUpperCase()}`;
}

export function createRefund({ store, hooks }: FakeContext, p: FormObject): Refund {
  const piId = optString(p, 'payment_intent');
  const chargeId = optString(p, 'charge');
  if (!piId && !chargeId) {
    throw new ApiError(400, 'One of the following params should be provided for this request: payment_intent or charge.');
  }
  let charge = chargeId ? store.charges.get(chargeId) : undefined;
  if (chargeId && !charge) throw noSuch('charge', chargeId, 'charge');
  if (piId) {
    const intent = store.intents.get(piId);
    if (!intent) throw noSuch('payment_intent', piId, 'payment_intent');
    charge = intent.latest_charge ? store.charges.get(intent.latest_charge) : undefined;
    if (intent.status !== 'succeeded' || !charge) {
      throw new ApiError(400, `This PaymentIntent (${piId}) does not have a successful charge to refund.`);
    }
  }
  if (!charge) throw noSuch('charge', String(chargeId), 'charge');

  const left = charge.amount - charge.amount_refunded;
  if (left === 0) {
    throw new ApiError(400, `Charge ${charge.id} has already been refunded.`, 'invalid_request_error', 'charge_already_refunded');
  }
  const amount = optInt(p, 'amount', 1) ?? left;
  if (amount > left) {
    throw invalid(
      'amount',
      `Refund amount (${money(amount, charge.currency)}) is greater than unrefunded amount on charge (${money(left, charge.currency)})`,
    );
  }
  const reason = optString(p, 'reason');
  if (reason && !REASONS.includes(reason)) throw invalid('reason', `Invalid reason: ${reason}`);

  const refund: Refund = {
    id: newId('re_'),
    object: 'refund',
    amount,
    currency: charge.currency,
    charge: charge.id,
    payment_intent: charge.payment_intent,
    reason,
    status: 'succeeded',
    metadata: metadata(p.metadata),
    created: now(),
  };
  store.refunds.set(refund.id, refund);
  charge.amount_refunded += amount;
  charge.refunded = charge.amount_refunded === charge.amount;
  hooks.emit('refund.created', refund);
  hooks.emit('charge.refunded', charge);
  return refund;
}
