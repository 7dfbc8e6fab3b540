// Routes of the hosted test-payment page at the session's `url` (/pay/:id).
// The card number decides the outcome (see TEST_CARDS in flow.ts); on
// success the browser is redirected (303) to the session's success_url.
import express, { type Request, type Response } from 'express';
import type { FakeContext } from './context.js';
import { type PayOutcome, successRedirect } from './flow.js';
import { authPage, cardForm, notice } from './html.js';
import type { Session } from './store.js';

function validExpiry(expiry: string): boolean {
  const m = /^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/.exec(expiry);
  if (!m) return false;
  const month = Number(m[1]);
  const year = m[2].length === 2 ? 2000 + Number(m[2]) : Number(m[2]);
  if (month < 1 || month > 12) return false;
  const today = new Date();
  return year * 12 + month >= today.getFullYear() * 12 + today.getMonth() + 1;
}

export function pageRouter({ store, flow }: FakeContext): express.Router {
  const router = express.Router();
  router.use(express.urlencoded({ extended: false }));

  // Finds the session, or answers with a page saying why it cannot be paid.
  const openSession = (req: Request, res: Response): Session | null => {
    const s = store.sessions.get(String(req.params.id));
    if (!s) {
      res.status(404).type('html').send(notice('Payment not found', 'This payment link is not known to the payments fake.'));
      return null;
    }
    if (s.status === 'complete') {
      res.status(200).type('html').send(notice('Already paid', 'This order has been paid.', { href: successRedirect(s), text: 'Back to the shop' }));
      return null;
    }
    if (s.status === 'expired' || s.expires_at < Date.now() / 1000) {
      const back = s.cancel_url ? { href: s.cancel_url, text: 'Back to the shop' } : undefined;
      res.status(410).type('html').send(notice('Payment link expired', 'This payment link has expired.', back));
      return null;
    }
    return s;
  };

  const answer = (res: Response, s: Session, result: PayOutcome, values: { card?: string; expiry?: string }) => {
    if (result.outcome === 'succeeded') return res.redirect(303, successRedirect(s));
    if (result.outcome === 'requires_action') return res.status(200).type('html').send(authPage(s));
    const status = result.outcome === 'declined' ? 402 : 422;
    return res.status(status).type('html').send(cardForm(s, result.message, values));
  };

  router.get('/:id', (req, res) => {
    const s = openSession(req, res);
    if (s) res.type('html').send(cardForm(s));
  });

  router.post('/:id', (req, res) => {
    const s = openSession(req, res);
    if (!s) return;
    const card = String(req.body?.card_number ?? '');
    const expiry = String(req.body?.expiry ?? '');
    const cvc = String(req.body?.cvc ?? '');
    const values = { card, expiry };
    if (!validExpiry(expiry)) {
      return answer(res, s, { outcome: 'invalid', message: 'Enter a future expiry date as MM/YY.' }, values);
    }
    if (!/^\d{3,4}$/.test(cvc.trim())) {
      return answer(res, s, { outcome: 'invalid', message: 'Enter the 3 or 4 digit CVC.' }, values);
    }
    return answer(res, s, flow.pay(s, card), values);
  });

  router.post('/:id/authenticate', (req, res) => {
    const s = openSession(req, res);
    if (!s) return;
    const approve = req.body?.decision === 'approve';
    return answer(res, s, flow.authenticate(s, approve), {});
  });

  return router;
}
