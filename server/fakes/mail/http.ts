// JSON API over the received mail, for the staff inbox page and for tests.
//   GET    /messages                          newest first, summaries (?to= filters by recipient)
//   GET    /messages/:id                      full message (text, html, attachment metadata)
//   GET    /messages/:id/attachments/:index   raw attachment bytes with its content type
//   DELETE /messages                          forget everything
//   GET    /health
import express from 'express';
import type { MailStore, StoredMessage } from './store.js';

function summary(m: StoredMessage) {
  return {
    id: m.id,
    receivedAt: m.receivedAt,
    from: m.from,
    to: m.to,
    subject: m.subject,
    date: m.date,
    hasHtml: m.html !== null,
    attachmentCount: m.attachments.length,
  };
}

function full(m: StoredMessage) {
  return {
    ...summary(m),
    envelope: m.envelope,
    cc: m.cc,
    messageId: m.messageId,
    text: m.text,
    html: m.html,
    // Metadata only; the bytes come from the attachment route.
    attachments: m.attachments.map(({ content: _c, ...meta }, index) => ({ index, ...meta })),
  };
}

export function mailApi(store: MailStore): express.Express {
  const app = express();
  app.disable('x-powered-by');

  app.get('/health', (_req, res) => {
    res.json({ ok: true });
  });

  app.get('/messages', (req, res) => {
    const to = typeof req.query.to === 'string' ? req.query.to.toLowerCase() : null;
    const list = store
      .newestFirst()
      .filter((m) => !to || [...m.to, ...m.cc, ...m.envelope.to].some((a) => a.toLowerCase() === to));
    res.json(list.map(summary));
  });

  app.get('/messages/:id', (req, res) => {
    const m = store.get(req.params.id);
    if (!m) {
      res.status(404).json({ error: 'No such message' });
      return;
    }
    res.json(full(m));
  });

  app.get('/messages/:id/attachments/:index', (req, res) => {
    const att = store.get(req.params.id)?.attachments[Number(req.params.index)];
    if (!att) {
      res.status(404).json({ error: 'No such attachment' });
      return;
    }
    if (att.filename) res.attachment(att.filename);
    res.type(att.contentType).send(Buffer.from(att.content, 'base64'));
  });

  app.delete('/messages', (_req, res) => {
    store.clear();
    res.status(204).end();
  });

  app.use((_req, res) => {
    res.status(404).json({ error: 'Unknown endpoint' });
  });
  return app;
}
