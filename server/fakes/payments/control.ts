// Control endpoints for tests and development, under /_fake so they can never
// be mistaken for provider calls. No API key needed; JSON in and out.
import express from 'express';
import type { FakeContext } from './context.js';
import { successRedirect } from './flow.js';
import { publicSession } from './store.js';

export function controlRouter(ctx: FakeContext): express.Router {
  const { store, hooks, flow } = ctx;
  const router = express.Router();
  router.use(express.json());

  router.get('/health', (_req, res) => {
    res.json({ ok: true, webhookUrl: hooks.config.url });
  });

  router.post('/reset', (_req, res) => {
    store.reset();
    res.json({ ok: true });
  });

  // Point webhooks somewhere else at runtime, e.g. at a server started later.
  router.post('/webhook', (req, res) => {
    const url = req.body?.url;
    if (url !== null && typeof url !== 'string') {
      res.status(400).json({ error: 'Body must be {"url": string | null}' });
      return;
    }
    hooks.config.url = url;
    res.json({ ok: true, webhookUrl: url });
  });

  router.get('/events', (req, res) => {
    const type = typeof req.query.type === 'string' ? req.query.type : undefined;
    res.json(store.events.filter((e) => !type || e.event.type === type));
  });

  router.post('/events/:id/resend', (req, res) => {
    const entry = store.findEvent(req.params.id);
    if (!entry) {
      res.status(404).json({ error: 'No such event' });
      return;
    }
    res.json({ event: entry.event, delivery: hooks.resend(entry.event) });
  });

  // Pay without a browser: {"outcome": "succeeds" | "declined" | "needs-confirmation"}.
  router.post('/sessions/:id/pay', (req, res) => {
    const s = store.sessions.get(req.params.id);
    if (!s) {
      res.status(404).json({ error: 'No such checkout session' });
      return;
    }
    const result = flow.pay(s, req.body?.outcome);
    res.status(result.outcome === 'invalid' ? 400 : 200).json({
      ...result,
      session: publicSession(s),
      redirect: result.outcome === 'succeeded' ? successRedirect(s) : null,
    });
  });

  // Answer the confirmation step of a "needs-confirmation" payment: {"confirm": true | false}.
  router.post('/sessions/:id/confirm', (req, res) => {
    const s = store.sessions.get(req.params.id);
    if (!s) {
      res.status(404).json({ error: 'No such checkout session' });
      return;
    }
    if (typeof req.body?.confirm !== 'boolean') {
      res.status(400).json({ error: 'Body must be {"confirm": true | false}' });
      return;
    }
    const result = flow.confirm(s, req.body.confirm);
    res.status(result.outcome === 'invalid' ? 400 : 200).json({
      ...result,
      session: publicSession(s),
      redirect: result.outcome === 'succeeded' ? successRedirect(s) : null,
    });
  });

  router.use((_req, res) => {
    res.status(404).json({ error: 'Unknown control endpoint' });
  });
  return router;
}
