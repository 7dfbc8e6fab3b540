// Shared setup for the payments fake tests: the fake, a webhook receiver and
// a real SDK client pointed at the fake purely through its configuration.
import Stripe from 'stripe';
import { afterAll, beforeAll, beforeEach } from 'vitest';
import { type PaymentsFake, startPaymentsFake } from '../../server/fakes/payments/index.js';
import { type Receiver, startReceiver } from './webhook-receiver.js';

export const SECRET = 'whsec_kneepoint_test';

export interface Env {
  fake: PaymentsFake;
  receiver: Receiver;
  stripe: Stripe;
}

export function usePaymentsFake(): Env {
  const env = {} as Env;
  beforeAll(async () => {
    env.receiver = await startReceiver();
    env.fake = await startPaymentsFake({
      port: 0,
      webhookUrl: env.receiver.url,
      webhookSecret: SECRET,
      retryDelaysMs: [30, 60, 120],
    });
    env.stripe = new Stripe('sk_test_fake', {
      host: '127.0.0.1',
      port: env.fake.port,
      protocol: 'http',
      maxNetworkRetries: 0,
    });
  });
  afterAll(async () => {
    await env.fake?.close();
    await env.receiver?.close();
  });
  beforeEach(async () => {
    await fetch(`${env.fake.url}/_fake/reset`, { method: 'POST' });
    env.receiver.received.length = 0;
    env.receiver.failNext(0);
    env.fake.setWebhookUrl(env.receiver.url);
  });
  return env;
}

export function newSession(stripe: Stripe, extra: Partial<Stripe.Checkout.SessionCreateParams> = {}) {
  return stripe.checkout.sessions.create({
    mode: 'payment',
    line_items: [
      { price_data: { currency: 'eur', unit_amount: 18_900, product_data: { name: 'Overdrive, silicon clipping' } }, quantity: 2 },
      { price_data: { currency: 'eur', unit_amount: 1_500, product_data: { name: 'Shipping' } }, quantity: 1 },
    ],
    success_url: 'http://127.0.0.1:9/orders/42?paid={CHECKOUT_SESSION_ID}',
    cancel_url: 'http://127.0.0.1:9/orders/42?cancelled=1',
    client_reference_id: 'order-42',
    customer_email: 'ada@example.test',
    metadata: { order_id: '42' },
    payment_intent_data: { metadata: { order_id: '42' } },
    ...extra,
  });
}

export async function payByControl(env: Env, sessionId: string, outcome: unknown) {
  const res = await fetch(`${env.fake.url}/_fake/sessions/${sessionId}/pay`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ outcome }),
  });
  return { status: res.status, body: await res.json() };
}

// Posts the hosted page's form the way a browser would, without following redirects.
export function postForm(url: string, fields: Record<string, string>) {
  return fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams(fields).toString(),
    redirect: 'manual',
  });
}
