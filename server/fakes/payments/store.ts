// In-memory state of the payments fake: sessions, payment intents, charges,
// refunds and the events sent about them. It is a stand-in, so nothing is
// persisted; `reset()` empties everything between tests.
import { randomBytes } from 'node:crypto';

export type Metadata = Record<string, string>;

export interface LineItem {
  id: string;
  object: 'item';
  description: string;
  quantity: number;
  currency: string;
  amount_subtotal: number;
  amount_total: number;
  price: { object: 'price'; currency: string; unit_amount: number; product_data: { name: string } };
}

export interface Session {
  id: string;
  object: 'checkout.session';
  mode: 'payment';
  status: 'open' | 'complete' | 'expired';
  payment_status: 'unpaid' | 'paid';
  amount_subtotal: number;
  amount_total: number;
  currency: string;
  client_reference_id: string | null;
  customer_email: string | null;
  customer_details: { email: string | null } | null;
  metadata: Metadata;
  payment_intent: string | null;
  success_url: string;
  cancel_url: string | null;
  url: string | null;
  created: number;
  expires_at: number;
  livemode: false;
  // Not part of the provider's object: kept aside and stripped when serialised.
  _lineItems: LineItem[];
  _intentMetadata: Metadata;
}

export interface PaymentError {
  type: 'card_error';
  code: string;
  decline_code?: string;
  message: string;
}

export interface PaymentIntent {
  id: string;
  object: 'payment_intent';
  amount: number;
  amount_received: number;
  currency: string;
  status: 'requires_payment_method' | 'requires_action' | 'succeeded' | 'canceled';
  metadata: Metadata;
  latest_charge: string | null;
  last_payment_error: PaymentError | null;
  payment_method_types: ['card'];
  created: number;
  livemode: false;
}

export interface Charge {
  id: string;
  object: 'charge';
  amount: number;
  amount_captured: number;
  amount_refunded: number;
  currency: string;
  paid: true;
  refunded: boolean;
  status: 'succeeded';
  payment_intent: string;
  metadata: Metadata;
  created: number;
  livemode: false;
}

export interface Refund {
  id: string;
  object: 'refund';
  amount: number;
  currency: string;
  charge: string;
  payment_intent: string;
  reason: string | null;
  status: 'succeeded';
  metadata: Metadata;
  created: number;
}

export interface Delivery {
  attempts: { at: number; status?: number; error?: string }[];
  state: 'pending' | 'delivered' | 'failed' | 'no_endpoint';
}

export interface FakeEvent {
  id: string;
  object: 'event';
  type: string;
  created: number;
  api_version: string;
  livemode: false;
  pending_webhooks: number;
  data: { object: unknown };
}

export function newId(prefix: string): string {
  return prefix + randomBytes(12).toString('hex');
}

export function now(): number {
  return Math.floor(Date.now() / 1000);
}

export class Store {
  sessions = new Map<string, Session>();
  intents = new Map<string, PaymentIntent>();
  charges = new Map<string, Charge>();
  refunds = new Map<string, Refund>();
  // Events in the order they were created, with how their delivery went.
  events: { event: FakeEvent; delivery: Delivery }[] = [];
  // Replies already given per Idempotency-Key, so an SDK retry of a POST
  // gets the same answer instead of creating a second object.
  idempotent = new Map<string, { status: number; body: unknown }>();

  reset(): void {
    this.sessions.clear();
    this.intents.clear();
    this.charges.clear();
    this.refunds.clear();
    this.events = [];
    this.idempotent.clear();
  }

  findEvent(id: string) {
    return this.events.find((e) => e.event.id === id);
  }
}

// The provider's JSON view of a session: private fields dropped.
export function publicSession(s: Session): Omit<Session, '_lineItems' | '_intentMetadata'> {
  const { _lineItems: _l, _intentMetadata: _m, ...rest } = s;
  return rest;
}
