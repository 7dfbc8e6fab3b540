// Forged and stale webhooks: nothing a third party can sign or replay changes an order.
import { describe, expect, it } from 'vitest';
import { signPayload } from '../../server/fakes/payments/index';
import { secretsInRepository } from '../support/repo-secrets';
import { placeOrder } from './orders-fixtures';
import { eventually, payWith, usePaymentsShop, WEBHOOK_SECRET } from './payments-setup';

const env = usePaymentsShop();
const { orderRow } = env;
const post = (body: string, signature: string) =>
  fetch(`${env.url}/api/payments/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signature }, body });
const now = () => Math.floor(Date.now() / 1000);

/** What a forgery could touch: the order row, its history, its mail, the event and refund records. */
async function footprint(orderId: number, eventIds: string[]) {
  const order = await orderRow(orderId);
  return {
    state: order.state, intent: order.payment_intent_id, paidAt: order.paid_at,
    history: (await env.t.knex('order_events').where({ order_id: orderId })).length,
    mail: (await env.t.knex('outbox').where('dedupe_key', 'like', `%:${orderId}`)).length,
    events: (await env.t.knex('payment_events').whereIn('id', eventIds)).length,
    refunds: (await env.t.knex('payment_refunds').where({ payment_intent_id: order.payment_intent_id ?? 'pi_forged' })).length,
  };
}

async function paidOrder() {
  const { order } = await placeOrder(env.customer, env.pedal, 1, 'led');
  const res = await env.customer.post(`/api/orders/${order.id}/checkout`).set('X-CSRF-Token', env.customer.csrf).send({}).expect(200);
  await payWith(env.fake, (res.body.url as string).split('/pay/')[1], 'succeeds');
  await eventually(async () => (await orderRow(order.id)).state === 'paid', 'order paid');
  // Let the provider's own deliveries settle, so the footprint below is stable.
  await new Promise((r) => setTimeout(r, 300));
  return order;
}

describe('forged events', () => {
  it('signed with every secret-like value in the repository, mark nothing paid or refunded', async () => {
    const secrets = secretsInRepository();
    expect(secrets.length).toBeGreaterThan(5);
    const { order: unpaid } = await placeOrder(env.customer, env.pedal);
    const paid = await paidOrder();
    const paidRow = await orderRow(paid.id);
    const completed = (secret: string, i: number) => ({
      id: `evt_forged_completed_${unpaid.id}_${i}`, object: 'event', type: 'checkout.session.completed', created: now(),
      data: { object: { id: `cs_forged_${i}`, object: 'checkout.session', payment_status: 'paid', status: 'complete', payment_intent: `pi_forged_${i}`, amount_total: unpaid.totalCents, client_reference_id: String(unpaid.id), metadata: { order_id: String(unpaid.id) } } },
      secret,
    });
    const refunded = (secret: string, i: number) => ({
      id: `evt_forged_refunded_${paid.id}_${i}`, object: 'event', type: 'charge.refunded', created: now(),
      data: { object: { id: `ch_forged_${i}`, object: 'charge', amount: paid.totalCents, amount_refunded: paid.totalCents, refunded: true, payment_intent: paidRow.payment_intent_id, metadata: { order_id: String(paid.id) } } },
      secret,
    });
    const events = secrets.flatMap((s, i) => [completed(s, i), refunded(s, i)]);
    const ids = events.map((e) => e.id);
    const before = { unpaid: await footprint(unpaid.id, ids), paid: await footprint(paid.id, ids) };
    for (const { secret, ...event } of events) {
      const body = JSON.stringify(event);
      const res = await post(body, signPayload(body, secret));
      expect(res.status, `signed with ${secret}`).toBe(400);
    }
    expect(await footprint(unpaid.id, ids)).toEqual(before.unpaid);
    expect(await footprint(paid.id, ids)).toEqual(before.paid);
    expect(before.unpaid.state).toBe('awaiting_payment');
    expect(before.paid.state).toBe('paid');
    // The same two events signed with this install's own secret do go through, so the refusals were the signatures.
    const [own1, own2] = [completed(WEBHOOK_SECRET, 9999), refunded(WEBHOOK_SECRET, 9999)];
    for (const { secret, ...event } of [own1, own2]) {
      const body = JSON.stringify(event);
      expect((await post(body, signPayload(body, secret))).status).toBe(200);
    }
    expect((await orderRow(unpaid.id)).state).toBe('paid');
    expect((await orderRow(paid.id)).state).toBe('refunded');
  });
});

describe('signature timestamps', () => {
  it('are accepted within five minutes either way and refused beyond, past or future, with nothing written', async () => {
    const { order } = await placeOrder(env.customer, env.pedal);
    const event = (suffix: string) => ({ id: `evt_clock_${order.id}_${suffix}`, object: 'event', type: 'checkout.session.expired', created: now(), data: { object: { id: `cs_clock_${order.id}`, object: 'checkout.session', metadata: { order_id: String(order.id) } } } });
    const attempt = async (suffix: string, offsetSeconds: number) => {
      const body = JSON.stringify(event(suffix));
      return (await post(body, signPayload(body, WEBHOOK_SECRET, now() + offsetSeconds))).status;
    };
    expect(await attempt('past-6m', -360)).toBe(400);
    expect(await attempt('future-6m', 360)).toBe(400);
    expect(await attempt('future-1h', 3600)).toBe(400);
    expect(await env.t.knex('payment_events').where('id', 'like', `evt_clock_${order.id}_%`)).toHaveLength(0);
    expect(await attempt('past-4m', -240)).toBe(200);
    expect(await attempt('future-4m', 240)).toBe(200);
    const stored = await env.t.knex('payment_events').where('id', 'like', `evt_clock_${order.id}_%`).pluck('id');
    expect(stored.sort()).toEqual([`evt_clock_${order.id}_future-4m`, `evt_clock_${order.id}_past-4m`]);
  });
});
