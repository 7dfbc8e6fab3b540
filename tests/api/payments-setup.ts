// The app on a real port with the payments fake (and optionally the mail fake) in-process, the
// fake's webhooks pointed at the app's endpoint with the app's secret.
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll } from 'vitest';
import { startPaymentsFake, type PayChoice, type PaymentsFake } from '../../server/fakes/payments/index';
import { listen } from '../support/browser';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { insertPedal, type PedalFixture } from './orders-fixtures';

// Made per test run, like an install's own: no value written in the repository signs a webhook here.
export const WEBHOOK_SECRET = `whsec_${randomBytes(24).toString('hex')}`;
export const API_KEY = `sk_test_${randomBytes(24).toString('hex')}`;

export interface PaymentsEnv {
  t: ReturnType<typeof startTestApp>;
  fake: PaymentsFake;
  url: string;
}

export function usePaymentsApp(extraEnv: () => Record<string, string> = () => ({})): PaymentsEnv {
  const env = {} as PaymentsEnv;
  let server: Awaited<ReturnType<typeof listen>>;
  beforeAll(async () => {
    env.fake = await startPaymentsFake({ port: 0, webhookSecret: WEBHOOK_SECRET, apiKey: API_KEY, retryDelaysMs: [50, 100, 200] });
    env.t = startTestApp({ PAYMENTS_PORT: String(env.fake.port), PAYMENTS_WEBHOOK_SECRET: WEBHOOK_SECRET, PAYMENTS_API_KEY: API_KEY, ...extraEnv() });
    server = await listen(env.t.app);
    env.url = server.url;
    env.fake.setWebhookUrl(`${server.url}/api/payments/webhook`);
  });
  afterAll(async () => {
    await env.fake?.close();
    await server?.close();
    await env.t?.stop();
  });
  return env;
}

/** The columns of an order row these tests read. */
export interface OrderRow {
  id: number;
  number: string;
  customer_id: number;
  state: string;
  payment_intent_id: string | null;
  last_payment_error: string | null;
  [column: string]: unknown;
}

export interface PaymentsShop extends PaymentsEnv {
  /** A pedal of its own with clipping options, made before the tests. */
  pedal: PedalFixture;
  /** The demo customer, signed in. */
  customer: TestAgent;
  orderRow: (id: number) => Promise<OrderRow>;
}

/** The payments app plus what every ordering test starts from: a pedal to order and a signed-in customer. */
export function usePaymentsShop(extraEnv?: () => Record<string, string>): PaymentsShop {
  const env = usePaymentsApp(extraEnv) as PaymentsShop;
  beforeAll(async () => {
    env.pedal = await insertPedal(env.t.knex);
    env.customer = await signedInAgent(env.t.app, DEMO.customer);
  });
  env.orderRow = async (id) => (await env.t.knex('orders').where({ id }).first()) as OrderRow;
  return env;
}

/** Waits until check() returns something truthy (webhooks arrive in the background). */
export async function eventually<T>(check: () => Promise<T | undefined | null | false>, what: string, timeoutMs = 8_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Pays a checkout session without a browser through the fake's control endpoint, with the outcome asked for. */
export async function payWith(fake: PaymentsFake, sessionId: string, outcome: PayChoice) {
  const res = await fetch(`${fake.url}/_fake/sessions/${sessionId}/pay`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome }) });
  return (await res.json()) as { outcome: string; redirect?: string };
}

export async function fakeEvents(fake: PaymentsFake, type?: string) {
  const res = await fetch(`${fake.url}/_fake/events${type ? `?type=${type}` : ''}`);
  return (await res.json()) as { event: { id: string; type: string; data: { object: Record<string, unknown> } }; delivery: { state: string } }[];
}
