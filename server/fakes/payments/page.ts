// Routes of the hosted test-payment page at the session's `url` (/pay/:id).
// The payer picks the outcome (PAY_OUTCOMES in flow.ts); on success the
// browser is redirected (303) to the session's success_url.
import express, { type Request, type Response } from 'express';
import type { FakeContext } from './context.js';
import { type PayOutcome, successRedirect } from './flow.js';
import { confirmPage, notice, outcomeForm } from './html.js';
import type { Session } from './store.js';

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

  const answer = (res: Response, s: Session, result: PayOutcome, chosen?: string) => {
    if (result.outcome === 'succeeded') return res.redirect(303, successRedirect(s));
    if (result.outcome === 'needs-confirmation') return res.status(200).type('html').send(confirmPage(s));
    const status = result.outcome === 'declined' ? 402 : 422;
    return res.status(status).type('html').send(outcomeForm(s, result.message, chosen));
  };

  router.get('/:id', (req, res) => {
    const s = openSession(req, res);
    if (s) res.type('html').send(outcomeForm(s));
  });

  router.post('/:id', (req, res) => {
    const s = openSession(req, res);
    if (!s) return;
    const choice = req.body?.outcome;
    return answer(res, s, flow.pay(s, choice), typeof choice === 'string' ? choice : undefined);
  });

  router.post('/:id/confirm', (req, res) => {
    const s = openSession(req, res);
    if (!s) return;
    const answerGiven = req.body?.answer;
    if (answerGiven !== 'yes' && answerGiven !== 'no') {
      return answer(res, s, { outcome: 'invalid', message: 'Answer the confirmation with yes or no.' });
    }
    return answer(res, s, flow.confirm(s, answerGiven === 'yes'));
  });

  return router;
}
