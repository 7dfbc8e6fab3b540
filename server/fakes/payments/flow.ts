// What happens when someone pays a session with a test card. Shared by the
// hosted page and the `/_fake` control endpoints so both behave the same.
import { type PaymentIntent, type Session, type Store, newId, now, publicSession } from './store.js';
import type { WebhookSender } from './webhooks.js';

// Test cards, digits only. Anything else is refused as an unknown number so a
// typo never silently "succeeds".
export const TEST_CARDS = {
  '4242424242424242': 'succeeds',
  '4000000000000002': 'declined',
  '4000002760003184': 'requires_authentication',
} as const;

export type PayOutcome =
  | { outcome: 'succeeded' }
  | { outcome: 'declined'; message: string }
  | { outcome: 'requires_action' }
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

  pay(session: Session, cardNumber: string): PayOutcome {
    if (session.status !== 'open') {
      return { outcome: 'invalid', message: `This checkout session is ${session.status}.` };
    }
    const digits = cardNumber.replace(/[\s-]/g, '');
    const kind = TEST_CARDS[digits as keyof typeof TEST_CARDS];
    if (!kind) {
      return { outcome: 'invalid', message: 'Unknown card number. Use one of the test cards listed on this page.' };
    }
    const intent = this.intentFor(session);
    if (kind === 'declined') {
      this.fail(intent, {
        code: 'card_declined',
        decline_code: 'generic_decline',
        message: 'Your card was declined.',
      });
      return { outcome: 'declined', message: 'Your card was declined.' };
    }
    if (kind === 'requires_authentication') {
      intent.status = 'requires_action';
      intent.last_payment_error = null;
      this.hooks.emit('payment_intent.requires_action', intent);
      return { outcome: 'requires_action' };
    }
    this.succeed(session, intent);
    return { outcome: 'succeeded' };
  }

  // The extra authentication step for the 3184 card: approve or fail it.
  authenticate(session: Session, approve: boolean): PayOutcome {
    const intent = session.payment_intent ? this.store.intents.get(session.payment_intent) : undefined;
    if (session.status !== 'open' || !intent || intent.status !== 'requires_action') {
      return { outcome: 'invalid', message: 'There is no authentication waiting for this session.' };
    }
    if (!approve) {
      const message = 'We are unable to authenticate your payment method. Please choose a different payment method and try again.';
      this.fail(intent, { code: 'payment_intent_authentication_failure', message });
      return { outcome: 'declined', message };
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
