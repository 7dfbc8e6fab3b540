// Shoppers read the shop's own sentences for a failed payment, chosen by the provider's error code,
// and never the provider's ids; staff still see both in the order's staff-only payment details.
import { beforeAll, describe, expect, it } from 'vitest';
import { DECLINED, NOT_CONFIRMED } from '../../server/fakes/payments/flow';
import { PAYMENT_FAILURE_FALLBACK, PAYMENT_FAILURE_SENTENCES, shopperPaymentMessage } from '../../server/services/payments/shopper-messages';
import { DEMO, signedInAgent, type TestAgent } from '../support/app';
import { placeOrder } from './orders-fixtures';
import { eventually, usePaymentsShop } from './payments-setup';

const env = usePaymentsShop();
let planner: TestAgent;
// Provider object ids: payment intents, refunds, sessions, charges, events.
const PROVIDER_ID = /\b(pi|re|cs|ch|evt)_[A-Za-z0-9]/;

beforeAll(async () => {
  planner = await signedInAgent(env.t.app, DEMO.planner);
});

const { orderRow } = env;

async function checkout(orderId: number) {
  const res = await env.customer.post(`/api/orders/${orderId}/checkout`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(200);
  return (res.body.url as string).split('/pay/')[1];
}

async function control(path: string, body: unknown) {
  const res = await fetch(`${env.fake.url}/_fake/sessions/${path}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  return (await res.json()) as { outcome: string };
}

async function failedMail(orderId: number) {
  const number = (await orderRow(orderId)).number;
  return eventually(async () => env.t.knex('outbox').where({ template: 'payment-failed' }).whereRaw(`data ->> 'orderNumber' = ?`, [number]).first(), 'the payment-failed mail');
}

describe('the shop\'s sentences for payment errors', () => {
  it('come from one table by code, the decline code first, with a fallback for unknown codes', () => {
    expect(shopperPaymentMessage({ code: 'card_declined', decline_code: 'insufficient_funds' })).toBe(PAYMENT_FAILURE_SENTENCES.insufficient_funds);
    expect(shopperPaymentMessage({ code: 'card_declined', decline_code: 'no_such_decline' })).toBe(PAYMENT_FAILURE_SENTENCES.card_declined);
    expect(shopperPaymentMessage({ code: 'expired_card' })).toBe(PAYMENT_FAILURE_SENTENCES.expired_card);
    expect(shopperPaymentMessage({ code: 'brand_new_code' })).toBe(PAYMENT_FAILURE_FALLBACK);
    expect(shopperPaymentMessage(null)).toBe(PAYMENT_FAILURE_FALLBACK);
  });

  it('reach the order page, its history and the mail after a decline; staff also see the provider\'s code', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    expect((await control(`${sessionId}/pay`, { outcome: 'declined' })).outcome).toBe('declined');
    const row = await eventually(async () => { const r = await orderRow(order.id); return r.last_payment_error ? r : null; }, 'failure recorded');
    expect(row.last_payment_error).toBe(PAYMENT_FAILURE_SENTENCES.card_declined);

    const mine = (await env.customer.get(`/api/orders/${order.id}`).expect(200)).body;
    expect(mine.order.lastPaymentError).toBe(PAYMENT_FAILURE_SENTENCES.card_declined);
    const shown = JSON.stringify(mine);
    expect(shown).not.toContain(DECLINED.message);
    expect(shown).not.toMatch(PROVIDER_ID);
    expect(mine.events.map((e: { message: string }) => e.message)).toContain(`Payment did not go through: ${PAYMENT_FAILURE_SENTENCES.card_declined}`);

    const mail = await failedMail(order.id);
    expect(mail.data.reason).toBe(PAYMENT_FAILURE_SENTENCES.card_declined);
    expect(JSON.stringify(mail.data)).not.toMatch(PROVIDER_ID);

    const staff = (await planner.get(`/api/orders/${order.id}`).expect(200)).body;
    const detail = staff.events.find((e: { kind: string }) => e.kind === 'payment-detail');
    expect(detail.message).toContain('card_declined');
    expect(detail.message).toContain(row.payment_intent_id);
  });

  it('say the payment was not confirmed when the payer refuses the confirmation step', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    expect((await control(`${sessionId}/pay`, { outcome: 'needs-confirmation' })).outcome).toBe('needs-confirmation');
    expect((await control(`${sessionId}/confirm`, { confirm: false })).outcome).toBe('declined');
    const row = await eventually(async () => { const r = await orderRow(order.id); return r.last_payment_error ? r : null; }, 'failure recorded');
    expect(row.last_payment_error).toBe(PAYMENT_FAILURE_SENTENCES.payment_intent_authentication_failure);
    expect((await failedMail(order.id)).data.reason).not.toContain(NOT_CONFIRMED.message);
  });
});

describe('a refund', () => {
  it('keeps the provider\'s refund and payment ids out of the customer\'s history, and shows them to staff', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    await control(`${await checkout(order.id)}/pay`, { outcome: 'succeeds' });
    await eventually(async () => (await orderRow(order.id)).state === 'paid', 'order paid');
    await env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(200);

    const mine = (await env.customer.get(`/api/orders/${order.id}`).expect(200)).body;
    expect(mine.order.state).toBe('refunded');
    expect(mine.events.map((e: { message: string }) => e.message)).toContain('Cancelled and refunded');
    expect(JSON.stringify(mine)).not.toMatch(PROVIDER_ID);
    const mail = await env.t.knex('outbox').where({ dedupe_key: `order-refunded:${order.id}` }).first();
    expect(JSON.stringify(mail.data)).not.toMatch(PROVIDER_ID);

    const staff = (await planner.get(`/api/orders/${order.id}`).expect(200)).body;
    const detail = staff.events.find((e: { kind: string }) => e.kind === 'payment-detail');
    expect(detail.message).toMatch(/^Refund re_\w+ of payment pi_\w+$/);
  });
});
