// Creates events and POSTs them to the configured endpoint, signed the way
// the SDK's `webhooks.constructEvent(payload, header, secret)` verifies:
//   Stripe-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256("<t>.<payload>", secret)>
// Each attempt is signed afresh (new timestamp), so a retry that comes late
// is still inside the receiver's tolerance window.
import { createHmac } from 'node:crypto';
import { type Delivery, type FakeEvent, type Store, newId, now } from './store.js';

export const API_VERSION = '2026-10-28.endive';

export interface WebhookConfig {
  url: string | null;
  secret: string;
  // Wait before attempt 2, 3, …; its length bounds the number of retries.
  retryDelaysMs: number[];
}

export function signPayload(payload: string, secret: string, timestamp = now()): string {
  const v1 = createHmac('sha256', secret).update(`${timestamp}.${payload}`).digest('hex');
  return `t=${timestamp},v1=${v1}`;
}

export class WebhookSender {
  private timers = new Set<NodeJS.Timeout>();
  private closed = false;

  constructor(
    private store: Store,
    public config: WebhookConfig,
  ) {}

  // Records the event and starts delivering it in the background; the API
  // reply never waits for the webhook, as with the hosted provider.
  emit(type: string, object: unknown): FakeEvent {
    const event: FakeEvent = {
      id: newId('evt_'),
      object: 'event',
      type,
      created: now(),
      api_version: API_VERSION,
      livemode: false,
      pending_webhooks: this.config.url ? 1 : 0,
      // A snapshot: later changes to the object must not alter a sent event.
      data: { object: structuredClone(object) },
    };
    const delivery: Delivery = { attempts: [], state: 'pending' };
    this.store.events.push({ event, delivery });
    this.deliver(event, delivery);
    return event;
  }

  // Sends a recorded event again (control endpoint), with a fresh delivery log.
  resend(event: FakeEvent): Delivery {
    const entry = this.store.findEvent(event.id);
    const delivery: Delivery = { attempts: [], state: 'pending' };
    if (entry) entry.delivery = delivery;
    this.deliver(event, delivery);
    return delivery;
  }

  private deliver(event: FakeEvent, delivery: Delivery): void {
    if (!this.config.url) {
      delivery.state = 'no_endpoint';
      return;
    }
    const payload = JSON.stringify(event, null, 2);
    void this.attempt(this.config.url, payload, delivery, 0);
  }

  private async attempt(url: string, payload: string, delivery: Delivery, n: number): Promise<void> {
    if (this.closed) return;
    const record: Delivery['attempts'][number] = { at: Date.now() };
    delivery.attempts.push(record);
    try {
      const res = await fetch(url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json; charset=utf-8',
          'stripe-signature': signPayload(payload, this.config.secret),
          'user-agent': 'kneepoint-payments-fake',
        },
        body: payload,
        signal: AbortSignal.timeout(10_000),
      });
      record.status = res.status;
      await res.arrayBuffer().catch(() => undefined);
      if (res.ok) {
        delivery.state = 'delivered';
        return;
      }
    } catch (err) {
      record.error = err instanceof Error ? err.message : String(err);
    }
    const wait = this.config.retryDelaysMs[n];
    if (wait === undefined || this.closed) {
      delivery.state = 'failed';
      return;
    }
    const timer = setTimeout(() => {
      this.timers.delete(timer);
      void this.attempt(url, payload, delivery, n + 1);
    }, wait);
    this.timers.add(timer);
  }

  // Stops pending retries so a closed fake leaves no timers behind.
  close(): void {
    this.closed = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
  }
}
