// What every part of the payments fake shares: state, webhook sender, payment
// flow, and the fake's own base URL (known only once it listens).
import type { PaymentFlow } from './flow.js';
import type { Store } from './store.js';
import type { WebhookSender } from './webhooks.js';

export interface FakeContext {
  store: Store;
  hooks: WebhookSender;
  flow: PaymentFlow;
  baseUrl(): string;
}
