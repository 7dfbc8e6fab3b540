// Paying through the hosted test page and the control endpoint, and the
// signed webhooks that follow, verified with the real SDK.
import Stripe from 'stripe';
import { describe, expect, it } from 'vitest';
import { DECLINED, NOT_CONFIRMED, PAY_OUTCOMES } from '../../server/fakes/payments/flow.js';
import { SECRET, newSession, payByControl, postForm, usePaymentsFake } from './payments-setup.js';

const env = usePaymentsFake();
const verify = (body: string, header: string, secret = SECRET) => env.stripe.webhooks.constructEvent(body, header, secret);
const eventsOf = async (type?: string) =>
  (await fetch(`${env.fake.url}/_fake/events${type ? `?type=${type}` : ''}`)).json();

describe('payments fake: hosted page', () => {
  it('shows the order, the three outcomes to pick from and a cancel link', async () => {
    const s = await newSession(env.stripe);
    const res = await fetch(s.url!);
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain('Local test payment page');
    expect(html).toContain('Overdrive, silicon clipping');
    expect(html).toContain('€393.00');
    for (const outcome of PAY_OUTCOMES) expect(html).toContain(`name="outcome" value="${outcome}"`);
    expect(html).not.toContain('card_number');
    expect(html).toContain(`href="${s.cancel_url!.replace('&', '&#38;')}"`);
  });

  it('"succeeds" pays and redirects to success_url with the session id', async () => {
    const s = await newSession(env.stripe);
    const res = await postForm(s.url!, { outcome: 'succeeds' });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe(`http://127.0.0.1:9/orders/42?paid=${s.id}`);
    const after = await env.stripe.checkout.sessions.retrieve(s.id);
    expect(after).toMatchObject({ status: 'complete', payment_status: 'paid', url: null });
    // Paying again is not possible; the page says it is paid.
    expect(await (await fetch(`${env.fake.url}/pay/${s.id}`)).text()).toContain('Already paid');
  });

  it('"declined" shows the refusal, keeps the session open, and a second try can succeed', async () => {
    const s = await newSession(env.stripe);
    const declined = await postForm(s.url!, { outcome: 'declined' });
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain(DECLINED.message);
    const open = await env.stripe.checkout.sessions.retrieve(s.id);
    expect(open).toMatchObject({ status: 'open', payment_status: 'unpaid' });

    const failed = await env.receiver.waitFor((r) => r.type === 'payment_intent.payment_failed');
    const event = verify(failed.body, failed.signature);
    const pi = event.data.object as Stripe.PaymentIntent;
    expect(pi.id).toBe(open.payment_intent);
    expect(pi.last_payment_error?.code).toBe('card_declined');
    expect(pi.metadata).toEqual({ order_id: '42' });

    expect((await postForm(s.url!, { outcome: 'succeeds' })).status).toBe(303);
    const paid = await env.stripe.checkout.sessions.retrieve(s.id);
    expect(paid.payment_intent).toBe(open.payment_intent);
  });

  it('refuses a missing or unknown outcome without touching the session', async () => {
    const s = await newSession(env.stripe);
    expect((await postForm(s.url!, {})).status).toBe(422);
    const unknown = await postForm(s.url!, { outcome: 'maybe' });
    expect(unknown.status).toBe(422);
    expect(await unknown.text()).toContain('Choose an outcome');
    const after = await env.stripe.checkout.sessions.retrieve(s.id);
    expect(after).toMatchObject({ status: 'open', payment_intent: null });
  });

  it('"needs-confirmation" shows its own confirmation page; yes completes the payment', async () => {
    const s = await newSession(env.stripe);
    const step = await postForm(s.url!, { outcome: 'needs-confirmation' });
    expect(step.status).toBe(200);
    const page = await step.text();
    expect(page).toContain('One more step');
    expect(page).toContain('Yes, take the payment');
    expect((await env.stripe.checkout.sessions.retrieve(s.id)).status).toBe('open');
    await env.receiver.waitFor((r) => r.type === 'payment_intent.requires_action');

    const done = await postForm(`${s.url}/confirm`, { answer: 'yes' });
    expect(done.status).toBe(303);
    expect((await env.stripe.checkout.sessions.retrieve(s.id)).payment_status).toBe('paid');
  });

  it('answering no on the confirmation page declines and leaves the session open', async () => {
    const s = await newSession(env.stripe);
    await postForm(s.url!, { outcome: 'needs-confirmation' });
    expect((await postForm(`${s.url}/confirm`, { answer: 'perhaps' })).status).toBe(422);
    const failed = await postForm(`${s.url}/confirm`, { answer: 'no' });
    expect(failed.status).toBe(402);
    expect(await failed.text()).toContain(NOT_CONFIRMED.message);
    const ev = await env.receiver.waitFor((r) => r.type === 'payment_intent.payment_failed');
    expect(JSON.parse(ev.body).data.object.last_payment_error.code).toBe('payment_intent_authentication_failure');
    expect((await env.stripe.checkout.sessions.retrieve(s.id)).status).toBe('open');
  });
});

describe('payments fake: control endpoint outcomes', () => {
  it('pays, declines or waits for confirmation as asked, and refuses anything else with 400', async () => {
    const paid = await newSession(env.stripe);
    expect((await payByControl(env, paid.id, 'succeeds')).body.outcome).toBe('succeeded');

    const declined = await newSession(env.stripe);
    const no = await payByControl(env, declined.id, 'declined');
    expect(no.body).toMatchObject({ outcome: 'declined', message: DECLINED.message, redirect: null });
    expect((await env.stripe.checkout.sessions.retrieve(declined.id)).status).toBe('open');

    const waiting = await newSession(env.stripe);
    expect((await payByControl(env, waiting.id, 'needs-confirmation')).body.outcome).toBe('needs-confirmation');
    const confirm = (body: unknown) => fetch(`${env.fake.url}/_fake/sessions/${waiting.id}/confirm`, {
      method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body),
    });
    expect((await confirm({ confirm: 'yes' })).status).toBe(400);
    const yes = await confirm({ confirm: true });
    expect(await yes.json()).toMatchObject({ outcome: 'succeeded', session: { payment_status: 'paid' } });

    const other = await newSession(env.stripe);
    for (const bad of ['pay', 'succeeded', null]) {
      const res = await payByControl(env, other.id, bad);
      expect(res.status).toBe(400);
      expect(res.body.outcome).toBe('invalid');
    }
  });
});

describe('payments fake: webhooks', () => {
  it('sends signed completion events the SDK verifies; tampering or a wrong secret fails', async () => {
    const s = await newSession(env.stripe);
    const paid = await payByControl(env, s.id, 'succeeds');
    expect(paid.body).toMatchObject({ outcome: 'succeeded', redirect: `http://127.0.0.1:9/orders/42?paid=${s.id}` });

    const got = await env.receiver.waitFor((r) => r.type === 'checkout.session.completed');
    const event = verify(got.body, got.signature);
    expect(event).toMatchObject({ object: 'event', type: 'checkout.session.completed', livemode: false });
    expect(event.id).toMatch(/^evt_/);
    const session = event.data.object as Stripe.Checkout.Session;
    expect(session).toMatchObject({ id: s.id, payment_status: 'paid', client_reference_id: 'order-42', metadata: { order_id: '42' } });
    await env.receiver.waitFor((r) => r.type === 'payment_intent.succeeded');

    const tampered = got.body.replace('"paid"', '"unpaid"');
    expect(tampered).not.toBe(got.body);
    expect(() => verify(tampered, got.signature)).toThrow(Stripe.errors.StripeSignatureVerificationError);
    expect(() => verify(got.body, got.signature, 'whsec_other')).toThrow(Stripe.errors.StripeSignatureVerificationError);
  });

  it('retries a failing endpoint with backoff until it accepts', async () => {
    env.receiver.failNext(2);
    const s = await newSession(env.stripe);
    await env.stripe.checkout.sessions.expire(s.id);
    const got = await env.receiver.waitFor((r) => r.type === 'checkout.session.expired');
    const [entry] = await eventsOf('checkout.session.expired');
    expect(entry.event.id).toBe(got.id);
    expect(entry.delivery.state).toBe('delivered');
    expect(entry.delivery.attempts.map((a: { status: number }) => a.status)).toEqual([500, 500, 200]);
    // Each attempt is signed afresh, and the one that arrived verifies.
    expect(verify(got.body, got.signature).id).toBe(got.id);
  });

  it('gives up after a bounded number of attempts when nobody listens', async () => {
    env.fake.setWebhookUrl('http://127.0.0.1:9/nowhere');
    const s = await newSession(env.stripe);
    await env.stripe.checkout.sessions.expire(s.id);
    let entry: { delivery: { state: string; attempts: unknown[] } } | undefined;
    for (let i = 0; i < 100 && entry?.delivery.state !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 20));
      [entry] = await eventsOf('checkout.session.expired');
    }
    expect(entry?.delivery.state).toBe('failed');
    expect(entry?.delivery.attempts).toHaveLength(4);
  });

  it('re-sends a recorded event on request', async () => {
    const s = await newSession(env.stripe);
    await env.stripe.checkout.sessions.expire(s.id);
    const first = await env.receiver.waitFor((r) => r.type === 'checkout.session.expired');
    const res = await fetch(`${env.fake.url}/_fake/events/${first.id}/resend`, { method: 'POST' });
    expect(res.status).toBe(200);
    for (let i = 0; i < 100 && env.receiver.received.filter((r) => r.id === first.id).length < 2; i++) {
      await new Promise((r) => setTimeout(r, 20));
    }
    const copies = env.receiver.received.filter((r) => r.id === first.id);
    expect(copies).toHaveLength(2);
    expect(copies[1].body).toBe(first.body);
  });
});
