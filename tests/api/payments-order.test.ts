// Provider events in every order of delivery, delivered more than once, end in the right state.
import { describe, expect, it } from 'vitest';
import { signPayload } from '../../server/fakes/payments/index';
import { cancelOrder } from '../../server/services/payments/cancel';
import { createPaymentsClient } from '../../server/services/payments/client';
import { DEMO } from '../support/app';
import { placeOrder } from './orders-fixtures';
import { API_KEY, eventually, fakeEvents, payWith, usePaymentsShop, WEBHOOK_SECRET } from './payments-setup';

const env = usePaymentsShop();
const { orderRow } = env;
type FakeEvent = Awaited<ReturnType<typeof fakeEvents>>[number]['event'];

async function deliver(event: FakeEvent) {
  const body = JSON.stringify(event);
  const res = await fetch(`${env.url}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signPayload(body, WEBHOOK_SECRET) }, body });
  expect(res.status).toBe(200);
  return ((await res.json()) as { outcome: string }).outcome;
}

/** Runs `act` with the fake's deliveries held, then returns the events it made about this order. */
async function held(orderId: number, sessionId: string, act: () => Promise<void>) {
  env.fake.setWebhookUrl(null);
  try {
    await act();
  } finally {
    env.fake.setWebhookUrl(`${env.url}/api/payments/webhook`);
  }
  const all = await fakeEvents(env.fake);
  const intent = all.find((e) => e.event.data.object.id === sessionId)?.event.data.object.payment_intent;
  return all.map((e) => e.event).filter((e) => {
    const o = e.data.object;
    return o.id === sessionId || o.payment_intent === intent || o.id === intent || (o.metadata as Record<string, string> | undefined)?.order_id === String(orderId);
  });
}

async function startPaying() {
  const { order } = await placeOrder(env.customer, env.pedal);
  const res = await env.customer.post(`/api/orders/${order.id}/checkout`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(200);
  return { order, sessionId: (res.body.url as string).split('/pay/')[1] };
}

/** Paid, then refunded at the provider (not through Kneepoint), with every event held back. */
async function paidThenRefundedAtProvider() {
  const { order, sessionId } = await startPaying();
  const events = await held(order.id, sessionId, async () => {
    await payWith(env.fake, sessionId, 'succeeds');
    const session = await (await fetch(`${env.fake.url}/v1/checkout/sessions/${sessionId}`, { headers: { authorization: `Bearer ${API_KEY}` } })).json();
    const refund = await fetch(`${env.fake.url}/v1/refunds`, { method: 'POST', headers: { authorization: `Bearer ${API_KEY}`, 'content-type': 'application/x-www-form-urlencoded' }, body: `payment_intent=${session.payment_intent}` });
    expect(refund.status).toBe(200);
  });
  expect(events.map((e) => e.type).sort()).toEqual(['charge.refunded', 'checkout.session.completed', 'payment_intent.succeeded', 'refund.created']);
  return { order, events };
}

function permutations<T>(items: T[]): T[][] {
  if (items.length <= 1) return [items];
  return items.flatMap((item, i) => permutations([...items.slice(0, i), ...items.slice(i + 1)]).map((rest) => [item, ...rest]));
}

async function expectRefundedOnce(orderId: number) {
  const row = await orderRow(orderId);
  expect(row.state).toBe('refunded');
  const changes = await env.t.knex('order_events').where({ order_id: orderId, kind: 'state-change' }).orderBy('id').pluck('to_state');
  expect(changes).toEqual(['paid', 'refunded']);
  expect(await env.t.knex('outbox').where({ dedupe_key: `order-refunded:${orderId}` })).toHaveLength(1);
  expect(await env.t.knex('outbox').where({ dedupe_key: `order-received:${orderId}` })).toHaveLength(1);
}

describe('a refund at the provider', () => {
  it('ends refunded in all 24 orders of its four events, the refund first included', async () => {
    const ends: string[] = [];
    const { events: model } = await paidThenRefundedAtProvider();
    const orders = permutations(model.map((e) => e.type));
    for (const typeOrder of orders) {
      const { order, events } = await paidThenRefundedAtProvider();
      for (const type of typeOrder) await deliver(events.find((e) => e.type === type)!);
      await expectRefundedOnce(order.id);
      ends.push((await orderRow(order.id)).state);
    }
    expect(ends).toEqual(Array(24).fill('refunded'));
  });

  it('changes nothing more when every event is delivered again, twice', async () => {
    const { order, events } = await paidThenRefundedAtProvider();
    for (const e of [...events].reverse()) await deliver(e);
    const history = await env.t.knex('order_events').where({ order_id: order.id }).count({ n: '*' }).first();
    const outcomes: string[] = [];
    for (let round = 0; round < 2; round++) for (const e of events) outcomes.push(await deliver(e));
    expect(new Set(outcomes)).toEqual(new Set(['duplicate']));
    expect(await env.t.knex('order_events').where({ order_id: order.id }).count({ n: '*' }).first()).toEqual(history);
    await expectRefundedOnce(order.id);
    const intent = (await orderRow(order.id)).payment_intent_id;
    expect(await env.t.knex('payment_refunds').where({ payment_intent_id: intent }).pluck('kind')).toEqual(expect.arrayContaining(['refund', 'charge']));
  });
});

describe('a refund Kneepoint asked for, reported before the call that asked returns', () => {
  it('moves the order with the cancellation\'s own words, as that call\'s result would', async () => {
    const { order, events } = await paidThenRefundedAtProvider();
    const byType = (type: string) => events.find((e) => e.type === type)!;
    await deliver(byType('payment_intent.succeeded'));
    const intent = (await orderRow(order.id)).payment_intent_id;
    // The customer's cancellation asked for this refund; the provider's event wins the race to the order.
    await env.t.knex('refund_requests').insert({
      order_id: order.id, payment_intent_id: intent, idempotency_key: `refund-order-${order.id}`, reason: 'cancelled',
      message: 'Changed my mind', status: 'done', refund_id: byType('refund.created').data.object.id,
    });
    for (const type of ['checkout.session.completed', 'refund.created', 'charge.refunded']) await deliver(byType(type));
    await expectRefundedOnce(order.id);
    const refunded = await env.t.knex('order_events').where({ order_id: order.id, kind: 'state-change', to_state: 'refunded' }).first('message');
    expect(refunded.message).toBe('Changed my mind');
  });
});

describe('a payment that lands after the order was cancelled', () => {
  it('keeps the order cancelled and refunds the money once, however often and in whatever order its events come', async () => {
    const { order, sessionId } = await startPaying();
    const events = await held(order.id, sessionId, async () => {
      await payWith(env.fake, sessionId, 'succeeds');
      await env.t.knex('orders').where({ id: order.id }).update({ state: 'cancelled' });
    });
    const payment = events.filter((e) => e.type === 'checkout.session.completed' || e.type === 'payment_intent.succeeded');
    expect(payment).toHaveLength(2);
    for (const e of [...payment, ...payment.reverse()]) await deliver(e);
    expect((await orderRow(order.id)).state).toBe('cancelled');
    const intent = payment.find((e) => e.type === 'payment_intent.succeeded')!.data.object.id;
    const refunds = (await fakeEvents(env.fake, 'refund.created')).filter((e) => e.event.data.object.payment_intent === intent);
    expect(refunds).toHaveLength(1);
    expect(await env.t.knex('order_events').where({ order_id: order.id, kind: 'refunded-after-cancel' })).toHaveLength(1);
    const requests = await env.t.knex('refund_requests').where({ order_id: order.id });
    expect(requests).toMatchObject([{ reason: 'late-payment', status: 'done', refund_id: refunds[0].event.data.object.id }]);
  });
});

describe('a customer’s cancellation of a paid order', () => {
  it('records the request before the provider call and the refund after it, once for two clicks', async () => {
    const { order, sessionId } = await startPaying();
    await payWith(env.fake, sessionId, 'succeeds');
    await eventually(async () => (await orderRow(order.id)).state === 'paid', 'order paid');
    const click = () => env.customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', env.customer.csrf).send({ reason: 'Two clicks' });
    const [a, b] = await Promise.all([click(), click()]);
    // Both answer in words: one refunds, the other either sees it refunded (409) or shares the same request.
    for (const res of [a, b]) expect([200, 409]).toContain(res.status);
    expect([a.status, b.status]).toContain(200);
    const row = await orderRow(order.id);
    expect(row.state).toBe('refunded');
    const refunds = (await fakeEvents(env.fake, 'refund.created')).filter((e) => e.event.data.object.payment_intent === row.payment_intent_id);
    expect(refunds).toHaveLength(1);
    expect(await env.t.knex('refund_requests').where({ order_id: order.id })).toMatchObject([{ reason: 'cancelled', status: 'done', refund_id: refunds[0].event.data.object.id, attempts: 0 }]);
  });
});

describe('provider calls', () => {
  it('run with no lock held on the order: another connection can lock it while the provider refunds', async () => {
    const { order, sessionId } = await startPaying();
    await payWith(env.fake, sessionId, 'succeeds');
    await eventually(async () => (await orderRow(order.id)).state === 'paid', 'order paid');
    const stripe = createPaymentsClient(env.t.config);
    const locks: string[] = [];
    // The real SDK call, observed: just before it goes out, try to lock the order row without waiting.
    const create = stripe.refunds.create.bind(stripe.refunds);
    stripe.refunds.create = (async (...args: Parameters<typeof create>) => {
      await env.t.knex.transaction(async (trx) => {
        await trx.raw('SELECT id FROM orders WHERE id = ? FOR UPDATE NOWAIT', [order.id]);
        locks.push('free');
      });
      return create(...args);
    }) as typeof stripe.refunds.create;
    const user = { id: (await orderRow(order.id)).customer_id, email: DEMO.customer, name: 'Dee', role: 'customer' as const };
    expect(await cancelOrder(env.t.knex, { stripe, config: env.t.config }, user, order.id)).toEqual({ state: 'refunded' });
    expect(locks).toEqual(['free']);
  });
});
