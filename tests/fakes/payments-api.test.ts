// Provider API calls against the payments fake, made with the real SDK.
import Stripe from 'stripe';
import { describe, expect, it } from 'vitest';
import { newSession, payByControl, usePaymentsFake } from './payments-setup.js';

const env = usePaymentsFake();

describe('payments fake: checkout sessions', () => {
  it('creates a session shaped like the provider’s and retrieves it', async () => {
    const s = await newSession(env.stripe);
    expect(s.id).toMatch(/^cs_test_/);
    expect(s).toMatchObject({
      object: 'checkout.session',
      mode: 'payment',
      status: 'open',
      payment_status: 'unpaid',
      amount_total: 2 * 18_900 + 1_500,
      currency: 'eur',
      client_reference_id: 'order-42',
      customer_email: 'ada@example.test',
      metadata: { order_id: '42' },
      payment_intent: null,
      livemode: false,
    });
    expect(s.url).toBe(`${env.fake.url}/pay/${s.id}`);

    const again = await env.stripe.checkout.sessions.retrieve(s.id, { expand: ['line_items'] });
    expect(again.amount_total).toBe(s.amount_total);
    expect(again.line_items?.data.map((li) => [li.description, li.quantity, li.amount_total])).toEqual([
      ['Overdrive, silicon clipping', 2, 37_800],
      ['Shipping', 1, 1_500],
    ]);
  });

  it('rejects bad params with the SDK’s typed error naming the param', async () => {
    const err = await newSession(env.stripe, {
      line_items: [{ price_data: { currency: 'eur', unit_amount: 100, product_data: { name: 'x' } } }],
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect((err as Stripe.errors.StripeError).param).toBe('line_items[0][quantity]');
    expect((err as Stripe.errors.StripeError).statusCode).toBe(400);

    const noUrl = await newSession(env.stripe, { success_url: 'not a url' }).catch((e: unknown) => e);
    expect((noUrl as Stripe.errors.StripeError).param).toBe('success_url');
  });

  it('answers 404 for unknown objects and 401 without a test key', async () => {
    await expect(env.stripe.checkout.sessions.retrieve('cs_test_nope')).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      statusCode: 404,
      code: 'resource_missing',
    });
    const live = new Stripe('sk_live_oops', { host: '127.0.0.1', port: env.fake.port, protocol: 'http' });
    await expect(live.checkout.sessions.retrieve('cs_test_x')).rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
    const bare = await fetch(`${env.fake.url}/v1/checkout/sessions/cs_test_x`);
    expect(bare.status).toBe(401);
  });

  it('replays a POST with the same idempotency key instead of creating twice', async () => {
    const a = await newSession(env.stripe, {}).then((s) => s.id);
    const opts = { idempotencyKey: 'order-42-attempt-1' };
    const params = {
      mode: 'payment' as const,
      line_items: [{ price_data: { currency: 'eur', unit_amount: 100, product_data: { name: 'x' } }, quantity: 1 }],
      success_url: 'http://127.0.0.1:9/ok',
    };
    const b = await env.stripe.checkout.sessions.create(params, opts);
    const c = await env.stripe.checkout.sessions.create(params, opts);
    expect(b.id).toBe(c.id);
    expect(b.id).not.toBe(a);
    const all = await env.stripe.checkout.sessions.list();
    expect(all.data).toHaveLength(2);
  });

  it('expires an open session once, and its page then says so', async () => {
    const s = await newSession(env.stripe);
    const expired = await env.stripe.checkout.sessions.expire(s.id);
    expect(expired).toMatchObject({ status: 'expired', url: null });
    await expect(env.stripe.checkout.sessions.expire(s.id)).rejects.toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    const page = await fetch(`${env.fake.url}/pay/${s.id}`);
    expect(page.status).toBe(410);
    await env.receiver.waitFor((r) => r.type === 'checkout.session.expired');
  });
});

describe('payments fake: payment intents and refunds', () => {
  async function paidSession() {
    const s = await newSession(env.stripe);
    const paid = await payByControl(env, s.id, 'succeeds');
    expect(paid.body.outcome).toBe('succeeded');
    return env.stripe.checkout.sessions.retrieve(s.id);
  }

  it('exposes the paid intent with metadata copied from payment_intent_data', async () => {
    const s = await paidSession();
    expect(s.payment_intent).toMatch(/^pi_/);
    const pi = await env.stripe.paymentIntents.retrieve(s.payment_intent as string);
    expect(pi).toMatchObject({ status: 'succeeded', amount: 39_300, amount_received: 39_300, currency: 'eur', metadata: { order_id: '42' } });
    const found = await env.stripe.checkout.sessions.list({ payment_intent: pi.id });
    expect(found.data.map((x) => x.id)).toEqual([s.id]);
  });

  it('refunds in parts, refuses more than is left, and sends refund events', async () => {
    const s = await paidSession();
    const pi = s.payment_intent as string;
    const part = await env.stripe.refunds.create({ payment_intent: pi, amount: 1_500, reason: 'requested_by_customer' });
    expect(part).toMatchObject({ object: 'refund', amount: 1_500, status: 'succeeded', payment_intent: pi });
    expect(part.id).toMatch(/^re_/);
    expect((await env.stripe.refunds.retrieve(part.id)).amount).toBe(1_500);

    await expect(env.stripe.refunds.create({ payment_intent: pi, amount: 40_000 })).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      param: 'amount',
    });
    const rest = await env.stripe.refunds.create({ payment_intent: pi });
    expect(rest.amount).toBe(39_300 - 1_500);
    await expect(env.stripe.refunds.create({ payment_intent: pi })).rejects.toMatchObject({ code: 'charge_already_refunded' });

    const refunded = await env.receiver.waitFor(
      (r) => r.type === 'charge.refunded' && JSON.parse(r.body).data.object.refunded === true,
    );
    expect(JSON.parse(refunded.body).data.object.amount_refunded).toBe(39_300);
    await env.receiver.waitFor((r) => r.type === 'refund.created' && JSON.parse(r.body).data.object.id === rest.id);
  });

  it('will not refund a session that was never paid', async () => {
    const s = await newSession(env.stripe);
    await payByControl(env, s.id, 'declined');
    const { payment_intent } = await env.stripe.checkout.sessions.retrieve(s.id);
    await expect(env.stripe.refunds.create({ payment_intent: payment_intent as string })).rejects.toBeInstanceOf(
      Stripe.errors.StripeInvalidRequestError,
    );
    await expect(env.stripe.refunds.create({ payment_intent: 'pi_unknown' })).rejects.toMatchObject({ statusCode: 404 });
  });
});
