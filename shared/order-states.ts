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
