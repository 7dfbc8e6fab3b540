/** Order states, in the order an order normally moves through them. */
export const ORDER_STATES = [
  'awaiting_payment', 'paid', 'scheduled', 'in_production', 'ready', 'shipped', 'delivered', 'cancelled', 'refunded',
] as const;
export type OrderState = (typeof ORDER_STATES)[number];

export const ORDER_STATE_LABELS: Record<OrderState, string> = {
  awaiting_payment: 'Awaiting payment',
  paid: 'Paid',
  scheduled: 'Scheduled into a batch',
  in_production: 'Being built',
  ready: 'Built and tested',
  shipped: 'Shipped',
  delivered: 'Delivered',
  cancelled: 'Cancelled',
  refunded: 'Refunded',
};

/** What each kind of history row is called, in sentence case; a state change is named by its state. */
export const ORDER_EVENT_LABELS: Record<string, string> = {
  placed: 'Order placed',
  note: 'Staff note',
  'payment-detail': 'Payment detail',
  'payment-failed': 'Payment failed',
  'checkout-expired': 'Payment page expired',
  'refunded-after-cancel': 'Refunded after cancelling',
  'refund-needs-attention': 'Refund needs attention',
};

/** The "what" of one history row, e.g. "Shipped" or "Staff note"; unknown kinds read as a sentence. */
export function orderEventLabel(event: { kind: string; to_state: OrderState | null }): string {
  if (event.kind === 'state-change' && event.to_state) return ORDER_STATE_LABELS[event.to_state];
  return ORDER_EVENT_LABELS[event.kind] ?? sentenceCase(event.kind.replace(/-/g, ' '));
}

/** Text as a sentence: first letter capital, the rest untouched, e.g. "shipped with Post" → "Shipped with Post". */
export const sentenceCase = (text: string) => text.charAt(0).toUpperCase() + text.slice(1);

/** Which state may follow which; anything else is an illegal change (409). */
export const ORDER_TRANSITIONS: Record<OrderState, readonly OrderState[]> = {
  awaiting_payment: ['paid', 'cancelled'],
  paid: ['scheduled', 'refunded'],
  scheduled: ['in_production', 'paid', 'refunded'],
  in_production: ['ready'],
  ready: ['shipped'],
  shipped: ['delivered'],
  delivered: [],
  cancelled: [],
  refunded: [],
};
