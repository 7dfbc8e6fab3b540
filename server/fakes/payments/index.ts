/**
 * Payments fake: a local stand-in for the hosted payments provider, reached by
 * the product only through the official `stripe` SDK configured with
 *   new Stripe('sk_test_…', { host: '127.0.0.1', port, protocol: 'http' })
 *
 * Provider API (needs `Authorization: Bearer sk_test_…`, form-encoded bodies):
 *   POST /v1/checkout/sessions               create (mode=payment, line_items[].price_data, …)
 *   GET  /v1/checkout/sessions               list (?payment_intent=, ?limit=)
 *   GET  /v1/checkout/sessions/:id           retrieve (expand[]=line_items|payment_intent)
 *   GET  /v1/checkout/sessions/:id/line_items
 *   POST /v1/checkout/sessions/:id/expire
 *   GET  /v1/payment_intents/:id, GET /v1/charges/:id
 *   POST /v1/refunds (payment_intent | charge, amount?, reason?, metadata?)
 *   GET  /v1/refunds/:id, GET /v1/events/:id
 *
 * Hosted test-payment page: GET/POST /pay/:sessionId (+ POST /pay/:id/confirm).
 *   The payer picks the outcome: succeeds · declined · needs-confirmation (a
 *   confirmation page follows, where the payer confirms or refuses).
 *
 * Webhooks (JSON POST to webhookUrl, `Stripe-Signature` header, retried with
 * backoff): payment_intent.succeeded, checkout.session.completed,
 * payment_intent.payment_failed, payment_intent.requires_action,
 * checkout.session.expired, refund.created, charge.refunded.
 * Correlate payment_intent.* events through `payment_intent_data[metadata]`
 * given at session creation (copied onto the intent, as the provider does).
 *
 * Control endpoints for tests (no key, JSON):
 *   GET  /_fake/health                    → {ok, webhookUrl}
 *   POST /_fake/reset                     forget all sessions, intents, refunds, events
 *   POST /_fake/webhook {url}             change (or null to stop) the webhook endpoint
 *   GET  /_fake/events?type=              every event with its delivery attempts
 *   POST /_fake/events/:id/resend         deliver an event again
 *   POST /_fake/sessions/:id/pay {outcome}   pay without a browser → {outcome, session, redirect}
 *     outcome: "succeeds" | "declined" | "needs-confirmation"
 *   POST /_fake/sessions/:id/confirm {confirm: boolean}   answer the confirmation step
 */
import type { AddressInfo } from 'node:net';
import { createHash, timingSafeEqual } from 'node:crypto';
import express from 'express';
import { apiRouter } from './api.js';
import type { FakeContext } from './context.js';
import { controlRouter } from './control.js';
import { ApiError } from './errors.js';
import { PaymentFlow } from './flow.js';
import { pageRouter } from './page.js';
import { Store } from './store.js';
import { WebhookSender } from './webhooks.js';

export { signPayload } from './webhooks.js';
export { PAY_OUTCOMES, type PayChoice } from './flow.js';

export interface PaymentsFakeOptions {
  port?: number; // 0 = any free port
  host?: string; // loopback by default
  webhookUrl?: string | null;
  webhookSecret?: string;
  // When set, the only API key accepted (the app's PAYMENTS_API_KEY); otherwise any test-mode key.
  apiKey?: string;
  // Delays before each retry of a failed webhook delivery.
  retryDelaysMs?: number[];
}

export interface PaymentsFake {
  url: string;
  port: number;
  setWebhookUrl(url: string | null): void;
  close(): Promise<void>;
}

// The same default as the app's PAYMENTS_WEBHOOK_SECRET, so the two agree when run on their own.
export const DEFAULT_WEBHOOK_SECRET = 'whsec_kneepoint_local';
const DEFAULT_RETRIES = [500, 1_000, 2_000, 4_000];

// The key arrives as a bearer token (or Basic user name); the provider-shaped 401 names no secret.
function onlyKey(expected: string): express.RequestHandler {
  const want = createHash('sha256').update(expected).digest();
  return (req, res, next) => {
    const auth = req.get('authorization') ?? '';
    const given = auth.startsWith('Bearer ') ? auth.slice(7).trim() : auth.startsWith('Basic ') ? Buffer.from(auth.slice(6), 'base64').toString('utf8').split(':')[0] : '';
    if (timingSafeEqual(createHash('sha256').update(given).digest(), want)) return next();
    res.status(401).json(new ApiError(401, 'Invalid API Key provided.', 'invalid_request_error').toJSON());
  };
}

export async function startPaymentsFake(opts: PaymentsFakeOptions = {}): Promise<PaymentsFake> {
  const host = opts.host ?? '127.0.0.1';
  const store = new Store();
  const hooks = new WebhookSender(store, {
    url: opts.webhookUrl ?? null,
    secret: opts.webhookSecret ?? DEFAULT_WEBHOOK_SECRET,
    retryDelaysMs: opts.retryDelaysMs ?? DEFAULT_RETRIES,
  });
  let baseUrl = '';
  const ctx: FakeContext = { store, hooks, flow: new PaymentFlow(store, hooks), baseUrl: () => baseUrl };

  const app = express();
  app.disable('x-powered-by');
  if (opts.apiKey) app.use('/v1', onlyKey(opts.apiKey));
  app.use('/v1', apiRouter(ctx));
  app.use('/pay', pageRouter(ctx));
  app.use('/_fake', controlRouter(ctx));
  app.get('/', (_req, res) => {
    res.type('text').send('Kneepoint payments fake. See server/fakes/payments/index.ts.');
  });

  const server = app.listen(opts.port ?? 3101, host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const port = (server.address() as AddressInfo).port;
  baseUrl = `http://${host}:${port}`;

  return {
    url: baseUrl,
    port,
    setWebhookUrl: (url) => {
      hooks.config.url = url;
    },
    close: () =>
      new Promise<void>((resolve) => {
        hooks.close();
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}
