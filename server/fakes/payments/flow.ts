// What happens when someone pays a session in the fake. Shared by the hosted
// page and the `/_fake` control endpoints so both behave the same. There are no
// card numbers: whoever pays picks the outcome they want to test.
import { type PaymentIntent, type Session, type Store, newId, now, publicSession } from './store.js';
import type { WebhookSender } from './webhooks.js';

/** The outcomes a test or a developer can ask for, on the page and at the control endpoint. */
export const PAY_OUTCOMES = ['succeeds', 'declined', 'needs-confirmation'] as const;
export type PayChoice = (typeof PAY_OUTCOMES)[number];
export const isPayChoice = (value: unknown): value is PayChoice => (PAY_OUTCOMES as readonly unknown[]).includes(value);

// The fake's own wording for the two ways a payment fails. The error codes are the API's shape
// (the product maps codes, never these sentences, to what a shopper reads).
export const DECLINED = { code: 'card_declined', decline_code: 'generic_decline', message: 'The payments fake declined this test payment.' };
export const NOT_CONFIRMED = { code: 'payment_intent_authentication_failure', message: 'The test payment was not confirmed on the confirmation step.' };

export type PayOutcome =
  | { outcome: 'succeeded' }
  | { outcome: 'declined'; message: string }
  | { outcome: 'needs-confirmation' }
  | { outcome: 'invalid'; message: string };

export class PaymentFlow {
  constructor(
    private store: Store,
    private hooks: WebhookSender,
  ) {}

  // The intent is made on the first attempt, as the provider does, and kept
  // for later attempts on the same session.
  private intentFor(session: Session): PaymentIntent {
    const existing = session.payment_intent && this.store.intents.get(session.payment_intent);
    if (existing) return existing;
    const intent: PaymentIntent = {
      id: newId('pi_'),
      object: 'payment_intent',
      amount: session.amount_total,
      amount_received: 0,
      currency: session.currency,
      status: 'requires_payment_method',
      metadata: { ...session._intentMetadata },
      latest_charge: null,
      last_payment_error: null,
      payment_method_types: ['card'],
      created: now(),
      livemode: false,
    };
    this.store.intents.set(intent.id, intent);
    session.payment_intent = intent.id;
    return intent;
  }

  pay(session: Session, choice: unknown): PayOutcome {
    if (session.status !== 'open') {
      return { outcome: 'invalid', message: `This checkout session is ${session.status}.` };
    }
    if (!isPayChoice(choice)) {
      return { outcome: 'invalid', message: `Choose an outcome: ${PAY_OUTCOMES.join(', ')}.` };
    }
    const intent = this.intentFor(session);
    if (choice === 'declined') {
      this.fail(intent, DECLINED);
      return { outcome: 'declined', message: DECLINED.message };
    }
    if (choice === 'needs-confirmation') {
      // The intent waits for the payer, as at the provider (status and event names are the API's).
      intent.status = 'requires_action';
      intent.last_payment_error = null;
      this.hooks.emit('payment_intent.requires_action', intent);
      return { outcome: 'needs-confirmation' };
    }
    this.succeed(session, intent);
    return { outcome: 'succeeded' };
  }

  // The confirmation step of a "needs-confirmation" payment: the payer confirms or refuses.
  confirm(session: Session, confirmed: boolean): PayOutcome {
    const intent = session.payment_intent ? this.store.intents.get(session.payment_intent) : undefined;
    if (session.status !== 'open' || !intent || intent.status !== 'requires_action') {
      return { outcome: 'invalid', message: 'No payment of this session is waiting for confirmation.' };
    }
    if (!confirmed) {
      this.fail(intent, NOT_CONFIRMED);
      return { outcome: 'declined', message: NOT_CONFIRMED.message };
    }
    this.succeed(session, intent);
    return { outcome: 'succeeded' };
  }

  expire(session: Session): void {
    session.status = 'expired';
    session.url = null;
    this.hooks.emit('checkout.session.expired', publicSession(session));
  }

  private fail(intent: PaymentIntent, error: { code: string; decline_code?: string; message: string }): void {
    intent.status = 'requires_payment_method';
    intent.last_payment_error = { type: 'card_error', ...error };
    this.hooks.emit('payment_intent.payment_failed', intent);
  }

  private succeed(session: Session, intent: PaymentIntent): void {
    const charge = {
      id: newId('ch_'),
      object: 'charge' as const,
      amount: intent.amount,
      amount_captured: intent.amount,
      amount_refunded: 0,
      currency: intent.currency,
      paid: true as const,
      refunded: false,
      status: 'succeeded' as const,
      payment_intent: intent.id,
      metadata: { ...intent.metadata },
      created: now(),
      livemode: false as const,
    };
    this.store.charges.set(charge.id, charge);
    Object.assign(intent, {
      status: 'succeeded',
      amount_received: intent.amount,
      latest_charge: charge.id,
      last_payment_error: null,
    });
    Object.assign(session, {
      status: 'complete',
      payment_status: 'paid',
      url: null,
      customer_details: { email: session.customer_email },
    });
    this.hooks.emit('payment_intent.succeeded', intent);
    this.hooks.emit('checkout.session.completed', publicSession(session));
  }
}

// Where the browser goes after paying: the provider fills in the session id.
export function successRedirect(session: Session): string {
  return session.success_url.replaceAll('{CHECKOUT_SESSION_ID}', session.id);
}
