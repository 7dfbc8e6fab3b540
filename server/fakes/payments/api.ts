// The /v1 API calls the SDK makes for our checkout flow. Bodies arrive
// form-encoded (see form.ts); replies are the provider-shaped JSON objects.
import express, { type Request, type Response } from 'express';
import type { FakeContext } from './context.js';
import { ApiError, apiErrorHandler, invalid, missing, noSuch, requestId } from './errors.js';
import { type FormObject, parseForm } from './form.js';
import { expandList, metadata, optInt, optObject, optString, optUrl, reqString } from './params.js';
import { type LineItem, type Session, newId, now, publicSession } from './store.js';
import { createRefund } from './refunds.js';

type Handler = (p: FormObject, req: Request) => unknown;

function apiKey(req: Request): string | null {
  const auth = req.get('authorization') ?? '';
  if (auth.startsWith('Bearer ')) return auth.slice(7).trim() || null;
  if (auth.startsWith('Basic ')) {
    const user = Buffer.from(auth.slice(6), 'base64').toString('utf8').split(':')[0];
    return user || null;
  }
  return null;
}

function params(req: Request): FormObject {
  const query = req.originalUrl.split('?')[1] ?? '';
  const body = typeof req.body === 'string' ? req.body : '';
  return { ...parseForm(query), ...parseForm(body) };
}

function list(url: string, data: unknown[]) {
  return { object: 'list', data, has_more: false, url };
}

export function apiRouter(ctx: FakeContext): express.Router {
  const { store, flow } = ctx;
  const router = express.Router();
  router.use(express.text({ type: () => true, limit: '1mb' }));

  // Only test-mode secret keys: a live key pointed at the fake is a config mistake.
  router.use((req, _res, next) => {
    const key = apiKey(req);
    if (!key) throw new ApiError(401, 'You did not provide an API key.', 'invalid_request_error');
    if (!/^(sk|rk)_test_/.test(key)) throw new ApiError(401, `Invalid API Key provided: ${key.slice(0, 8)}…`);
    next();
  });

  // Wraps a handler: decodes params, replays idempotent POSTs, sends JSON.
  const route = (fn: Handler) => (req: Request, res: Response) => {
    const idemKey = req.method === 'POST' ? req.get('idempotency-key') : undefined;
    const memoKey = idemKey && `${apiKey(req)}:${req.path}:${idemKey}`;
    const seen = memoKey ? store.idempotent.get(memoKey) : undefined;
    res.set('request-id', requestId());
    if (seen) {
      res.set('idempotent-replayed', 'true').status(seen.status).json(seen.body);
      return;
    }
    let status = 200;
    let body: unknown;
    try {
      body = fn(params(req), req);
    } catch (err) {
      if (!(err instanceof ApiError)) throw err;
      status = err.status;
      body = err.toJSON();
    }
    if (memoKey) store.idempotent.set(memoKey, { status, body });
    res.status(status).json(body);
  };

  const getSession = (id: string): Session => {
    const s = store.sessions.get(id);
    if (!s) throw noSuch('checkout.session', id);
    return s;
  };

  const lineItemList = (s: Session) => list(`/v1/checkout/sessions/${s.id}/line_items`, s._lineItems);

  const sessionView = (s: Session, p: FormObject) => {
    const view: Record<string, unknown> = publicSession(s);
    const expand = expandList(p);
    if (expand.includes('line_items')) view.line_items = lineItemList(s);
    if (expand.includes('payment_intent') && s.payment_intent) view.payment_intent = store.intents.get(s.payment_intent);
    return view;
  };

  router.post('/checkout/sessions', route((p) => {
    const mode = reqString(p, 'mode');
    if (mode !== 'payment') throw invalid('mode', 'The payments fake supports only mode=payment.');
    const rawItems = p.line_items;
    if (!Array.isArray(rawItems) || rawItems.length === 0) throw missing('line_items');
    const items: LineItem[] = rawItems.map((raw, i) => {
      const name = `line_items[${i}]`;
      if (typeof raw !== 'object' || Array.isArray(raw)) throw invalid(name, `Invalid ${name}`);
      const priceData = optObject(raw, 'price_data');
      if (!priceData) throw missing(`${name}[price_data]`);
      const productData = optObject(priceData, 'product_data');
      const productName = productData && optString(productData, 'name');
      if (!productName) throw missing(`${name}[price_data][product_data][name]`);
      const currency = reqString(priceData, 'currency').toLowerCase();
      if (!/^[a-z]{3}$/.test(currency)) throw invalid(`${name}[price_data][currency]`, `Invalid currency: ${currency}`);
      const unit = optInt(priceData, 'unit_amount');
      if (unit === null) throw missing(`${name}[price_data][unit_amount]`);
      const quantity = optInt(raw, 'quantity', 1);
      if (quantity === null) throw missing(`${name}[quantity]`);
      return {
        id: newId('li_'),
        object: 'item',
        description: productName,
        quantity,
        currency,
        amount_subtotal: unit * quantity,
        amount_total: unit * quantity,
        price: { object: 'price', currency, unit_amount: unit, product_data: { name: productName } },
      };
    });
    const currency = items[0].currency;
    if (items.some((it) => it.currency !== currency)) {
      throw invalid('line_items', 'All line items must use the same currency.');
    }
    const success = optUrl(p, 'success_url');
    if (!success) throw missing('success_url');
    const total = items.reduce((sum, it) => sum + it.amount_total, 0);
    const id = newId('cs_test_');
    const created = now();
    const intentData = optObject(p, 'payment_intent_data');
    const session: Session = {
      id,
      object: 'checkout.session',
      mode: 'payment',
      status: 'open',
      payment_status: 'unpaid',
      amount_subtotal: total,
      amount_total: total,
      currency,
      client_reference_id: optString(p, 'client_reference_id'),
      customer_email: optString(p, 'customer_email'),
      customer_details: null,
      metadata: metadata(p.metadata),
      payment_intent: null,
      success_url: success,
      cancel_url: optUrl(p, 'cancel_url'),
      url: `${ctx.baseUrl()}/pay/${id}`,
      created,
      expires_at: optInt(p, 'expires_at') ?? created + 24 * 3600,
      livemode: false,
      _lineItems: items,
      _intentMetadata: metadata(intentData?.metadata, 'payment_intent_data[metadata]'),
    };
    store.sessions.set(id, session);
    return sessionView(session, p);
  }));

  router.get('/checkout/sessions', route((p) => {
    const pi = optString(p, 'payment_intent');
    const limit = optInt(p, 'limit', 1) ?? 10;
    const all = [...store.sessions.values()].reverse().filter((s) => !pi || s.payment_intent === pi);
    return list('/v1/checkout/sessions', all.slice(0, limit).map((s) => sessionView(s, p)));
  }));

  router.get('/checkout/sessions/:id', route((p, req) => sessionView(getSession(String(req.params.id)), p)));

  router.get('/checkout/sessions/:id/line_items', route((_p, req) => lineItemList(getSession(String(req.params.id)))));

  router.post('/checkout/sessions/:id/expire', route((p, req) => {
    const s = getSession(String(req.params.id));
    if (s.status !== 'open') {
      throw new ApiError(400, `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of "${s.status}".`);
    }
    flow.expire(s);
    return sessionView(s, p);
  }));

  router.get('/payment_intents/:id', route((_p, req) => {
    const id = String(req.params.id);
    const pi = store.intents.get(id);
    if (!pi) throw noSuch('payment_intent', id, 'intent');
    return pi;
  }));

  router.get('/charges/:id', route((_p, req) => {
    const id = String(req.params.id);
    const charge = store.charges.get(id);
    if (!charge) throw noSuch('charge', id);
    return charge;
  }));

  router.post('/refunds', route((p) => createRefund(ctx, p)));

  router.get('/refunds/:id', route((_p, req) => {
    const id = String(req.params.id);
    const refund = store.refunds.get(id);
    if (!refund) throw noSuch('refund', id);
    return refund;
  }));

  router.get('/events/:id', route((_p, req) => {
    const id = String(req.params.id);
    const entry = store.findEvent(id);
    if (!entry) throw noSuch('event', id);
    return entry.event;
  }));

  router.use((req) => {
    throw new ApiError(404, `Unrecognized request URL (${req.method}: ${req.originalUrl}). The payments fake implements only the calls Kneepoint uses.`);
  });
  router.use(apiErrorHandler);
  return router;
}
