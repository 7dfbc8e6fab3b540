import { describe, expect, it } from 'vitest';
import { signPayload } from '../../server/fakes/payments/index';
import { DEMO } from '../support/app';
import { placeOrder } from './orders-fixtures';
import { eventually, fakeEvents, payWith, usePaymentsShop, WEBHOOK_SECRET } from './payments-setup';

const env = usePaymentsShop();
const { orderRow } = env;
const sessionIdOf = (url: string) => url.split('/pay/')[1];

async function checkout(orderId: number) {
  const res = await env.customer.post(`/api/orders/${orderId}/checkout`).set('X-CSRF-Token', env.customer.csrf).send({ totalCents: 1 }).expect(200);
  return sessionIdOf(res.body.url as string);
}

async function paidOrder() {
  const { order } = await placeOrder(env.customer, env.pedal, 1, 'led');
  await payWith(env.fake, await checkout(order.id), 'succeeds');
  await eventually(async () => (await orderRow(order.id)).state === 'paid', 'order paid');
  return order;
}

function post(body: string, signature: string) {
  return fetch(`${env.url}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signature }, body });
}

describe('checkout through the payments SDK', () => {
  it('opens a session for exactly the order’s stored total, reuses it while open, and pays the order once', async () => {
    const { order } = await placeOrder(env.customer, env.pedal, 2, 'led');
    const sessionId = await checkout(order.id);
    expect(await checkout(order.id)).toBe(sessionId);
    const session = await (fetch(`${env.fake.url}/v1/checkout/sessions/${sessionId}?expand[]=line_items`, { headers: { authorization: `Bearer ${env.t.config.PAYMENTS_API_KEY}` } }).then((r) => r.json()));
    expect(session.amount_total).toBe(order.totalCents);
    expect(session.metadata).toEqual({ order_id: String(order.id), order_number: order.number });
    expect(session.success_url).toContain(`/orders/${order.id}`);

    const paid = await payWith(env.fake, sessionId, 'succeeds');
    expect(paid.outcome).toBe('succeeded');
    const row = await eventually(async () => { const r = await orderRow(order.id); return r.state === 'paid' && r; }, 'order paid');
    expect(row.payment_intent_id).toMatch(/^pi_/);
    expect(row.paid_at).toBeInstanceOf(Date);
    // Both provider events (intent succeeded, session completed) arrive; the order moves and mails once.
    await eventually(async () => (await fakeEvents(env.fake, 'checkout.session.completed')).some((e) => e.event.data.object.id === sessionId && e.delivery.state === 'delivered'), 'both events delivered');
    const changes = await env.t.knex('order_events').where({ order_id: order.id, kind: 'state-change' });
    expect(changes.map((c) => c.to_state)).toEqual(['paid']);
    const mail = await env.t.knex('outbox').where({ template: 'order-received' }).andWhere('dedupe_key', `order-received:${order.id}`);
    expect(mail).toHaveLength(1);
    expect(mail[0].to_address).toBe(DEMO.customer);
    await env.customer.post(`/api/orders/${order.id}/checkout`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(409);
  });

  it('keeps a declined order awaiting payment with the reason, then lets the customer pay', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    expect((await payWith(env.fake, sessionId, 'declined')).outcome).toBe('declined');
    const row = await eventually(async () => { const r = await orderRow(order.id); return r.last_payment_error ? r : null; }, 'failure recorded');
    expect(row.state).toBe('awaiting_payment');
    expect(row.last_payment_error).toMatch(/declined/);
    expect(await env.t.knex('outbox').where({ template: 'payment-failed', to_address: DEMO.customer }).andWhereLike('dedupe_key', 'payment-failed:evt_%')).not.toHaveLength(0);
    const detail = await env.customer.get(`/api/orders/${order.id}`).expect(200);
    expect(detail.body.order.lastPaymentError).toMatch(/declined/);

    await payWith(env.fake, sessionId, 'succeeds');
    const paid = await eventually(async () => { const r = await orderRow(order.id); return r.state === 'paid' && r; }, 'order paid after retry');
    expect(paid.last_payment_error).toBeNull();
  });
});

describe('the webhook endpoint', () => {
  it('refuses a tampered body or a wrong or stale signature with 400 and changes nothing', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const event = { id: `evt_forged_${order.id}`, object: 'event', type: 'payment_intent.succeeded', data: { object: { id: 'pi_forged', object: 'payment_intent', metadata: { order_id: String(order.id) } } } };
    const body = JSON.stringify(event);
    const tampered = body.replace('pi_forged', 'pi_forged2');
    expect((await post(tampered, signPayload(body, WEBHOOK_SECRET))).status).toBe(400);
    expect((await post(body, signPayload(body, 'whsec_someone_else'))).status).toBe(400);
    const tenMinutesAgo = Math.floor(Date.now() / 1000) - 600;
    expect((await post(body, signPayload(body, WEBHOOK_SECRET, tenMinutesAgo))).status).toBe(400);
    expect((await post(body, '')).status).toBe(400);
    expect((await orderRow(order.id)).state).toBe('awaiting_payment');
    expect(await env.t.knex('payment_events').where({ id: event.id })).toHaveLength(0);
    // The same event, correctly signed, is accepted — so the refusals above were about the signature.
    const ok = await post(body, signPayload(body, WEBHOOK_SECRET));
    expect(ok.status).toBe(200);
    expect((await orderRow(order.id)).state).toBe('paid');
  });

  it('processes the same event once however often it is delivered', async () => {
    const order = await paidOrder();
    const [succeeded] = (await fakeEvents(env.fake, 'payment_intent.succeeded')).filter((e) => e.event.data.object.metadata && (e.event.data.object.metadata as Record<string, string>).order_id === String(order.id));
    const before = await env.t.knex('order_events').where({ order_id: order.id }).count({ n: '*' }).first();
    const body = JSON.stringify(succeeded.event);
    const again = await post(body, signPayload(body, WEBHOOK_SECRET));
    expect(await again.json()).toMatchObject({ outcome: 'duplicate' });
    await fetch(`${env.fake.url}/_fake/events/${succeeded.event.id}/resend`, { method: 'POST' });
    await eventually(async () => (await fakeEvents(env.fake)).find((e) => e.event.id === succeeded.event.id)?.delivery.state === 'delivered', 'resent');
    const after = await env.t.knex('order_events').where({ order_id: order.id }).count({ n: '*' }).first();
    expect(after?.n).toBe(before?.n);
    expect(await env.t.knex('payment_events').where({ id: succeeded.event.id })).toHaveLength(1);
    expect(await env.t.knex('outbox').where({ dedupe_key: `order-received:${order.id}` })).toHaveLength(1);
  });

  it('does not un-pay an order when an older failure arrives after the success', async () => {
    const order = await paidOrder();
    const row = await orderRow(order.id);
    const late = { id: `evt_late_failure_${order.id}`, object: 'event', type: 'payment_intent.payment_failed', created: 1, data: { object: { id: row.payment_intent_id, object: 'payment_intent', metadata: { order_id: String(order.id) }, last_payment_error: { code: 'card_declined', message: 'Declined in a test.' } } } };
    const body = JSON.stringify(late);
    expect((await post(body, signPayload(body, WEBHOOK_SECRET))).status).toBe(200);
    const after = await orderRow(order.id);
    expect(after.state).toBe('paid');
    expect(after.last_payment_error).toBeNull();
    expect(await env.t.knex('outbox').where({ dedupe_key: `payment-failed:${late.id}` })).toHaveLength(0);
  });

  it('pays an order when the session-completed event arrives before the intent event', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    env.fake.setWebhookUrl(null); // hold deliveries, then hand them over in reverse
    try {
      await payWith(env.fake, sessionId, 'succeeds');
      const mine = (await fakeEvents(env.fake)).filter((e) => e.event.data.object.id === sessionId || (e.event.data.object.metadata as Record<string, string> | undefined)?.order_id === String(order.id));
      expect(mine.map((e) => e.event.type)).toEqual(['payment_intent.succeeded', 'checkout.session.completed']);
      for (const e of [...mine].reverse()) {
        const body = JSON.stringify(e.event);
        expect((await post(body, signPayload(body, WEBHOOK_SECRET))).status).toBe(200);
      }
    } finally {
      env.fake.setWebhookUrl(`${env.url}/api/payments/webhook`);
    }
    const row = await orderRow(order.id);
    expect(row.state).toBe('paid');
    expect(row.payment_intent_id).toMatch(/^pi_/);
    expect(await env.t.knex('order_events').where({ order_id: order.id, kind: 'state-change' })).toHaveLength(1);
  });
});

describe('cancelling', () => {
  it('refunds a paid order through the SDK, once, and mails the customer', async () => {
    const order = await paidOrder();
    const res = await env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({ reason: 'Changed my mind' }).expect(200);
    expect(res.body.state).toBe('refunded');
    const row = await orderRow(order.id);
    expect(row.state).toBe('refunded');
    const refunds = await eventually(async () => { const r = (await fakeEvents(env.fake, 'refund.created')).filter((e) => e.event.data.object.payment_intent === row.payment_intent_id); return r.length > 0 && r; }, 'refund at the provider');
    expect(refunds).toHaveLength(1);
    expect(refunds[0].event.data.object.amount).toBe(order.totalCents);
    // The provider's own refund events then arrive and change nothing more.
    await eventually(async () => (await fakeEvents(env.fake, 'charge.refunded')).some((e) => e.event.data.object.payment_intent === row.payment_intent_id && e.delivery.state === 'delivered'), 'charge.refunded delivered');
    expect(await env.t.knex('order_events').where({ order_id: order.id, to_state: 'refunded' })).toHaveLength(1);
    expect(await env.t.knex('outbox').where({ dedupe_key: `order-refunded:${order.id}` })).toHaveLength(1);
    await env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(409);
  });

  it('simply cancels an order awaiting payment and closes its payment page', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    const res = await env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(200);
    expect(res.body.state).toBe('cancelled');
    const paying = await payWith(env.fake, sessionId, 'succeeds');
    expect(paying.outcome).toBe('invalid');
    expect((await orderRow(order.id)).state).toBe('cancelled');
  });

  it('refuses with 409 once units are being built, and changes nothing', async () => {
    const order = await paidOrder();
    await env.t.knex('orders').where({ id: order.id }).update({ state: 'in_production' });
    const res = await env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(409);
    expect(res.body.error.message).toMatch(/being built/);
    expect((await orderRow(order.id)).state).toBe('in_production');
    const row = await orderRow(order.id);
    expect((await fakeEvents(env.fake, 'refund.created')).filter((e) => e.event.data.object.payment_intent === row.payment_intent_id)).toHaveLength(0);
  });
});

describe('an expired payment page', () => {
  it('notes the expiry and gives the next attempt a fresh, payable session', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const first = await checkout(order.id);
    await fetch(`${env.fake.url}/v1/checkout/sessions/${first}/expire`, { method: 'POST', headers: { authorization: `Bearer ${env.t.config.PAYMENTS_API_KEY}` } });
    await eventually(async () => (await env.t.knex('order_events').where({ order_id: order.id, kind: 'checkout-expired' })).length > 0, 'the expiry noted');
    const second = await checkout(order.id);
    expect(second).not.toBe(first);
    expect((await payWith(env.fake, second, 'succeeds')).outcome).toBe('succeeded');
    await eventually(async () => (await orderRow(order.id)).state === 'paid', 'paid on the second session');
  });
});

describe('a payment that arrives after cancelling', () => {
  it('keeps the order cancelled and refunds the late payment once', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const sessionId = await checkout(order.id);
    env.fake.setWebhookUrl(null); // the payment lands while the cancellation is under way
    try {
      await payWith(env.fake, sessionId, 'succeeds');
      await env.t.knex('orders').where({ id: order.id }).update({ state: 'cancelled' });
      const mine = (await fakeEvents(env.fake)).filter((e) => e.event.data.object.id === sessionId || (e.event.data.object.metadata as Record<string, string> | undefined)?.order_id === String(order.id));
      for (const e of mine) {
        const body = JSON.stringify(e.event);
        expect((await post(body, signPayload(body, WEBHOOK_SECRET))).status).toBe(200);
      }
    } finally {
      env.fake.setWebhookUrl(`${env.url}/api/payments/webhook`);
    }
    expect((await orderRow(order.id)).state).toBe('cancelled');
    const intent = (await fakeEvents(env.fake, 'payment_intent.succeeded')).find((e) => (e.event.data.object.metadata as Record<string, string>).order_id === String(order.id));
    const refunds = (await fakeEvents(env.fake, 'refund.created')).filter((e) => e.event.data.object.payment_intent === intent?.event.data.object.id);
    expect(refunds).toHaveLength(1);
    expect(await env.t.knex('order_events').where({ order_id: order.id, kind: 'refunded-after-cancel' })).toHaveLength(1);
  });
});
