import { ORDER_STATE_LABELS, type OrderState } from '../../../shared/order-states';

// The usual path of an order; cancelled and refunded orders leave it and say so instead.
const PATH: OrderState[] = ['awaiting_payment', 'paid', 'scheduled', 'in_production', 'ready', 'shipped', 'delivered'];

export function OrderProgress({ state }: { state: OrderState }) {
  if (state === 'cancelled' || state === 'refunded') {
    return <p className="font-semibold text-alarm-700">{ORDER_STATE_LABELS[state]}</p>;
  }
  const at = PATH.indexOf(state);
  return (
    <ol aria-label="Order progress" className="flex flex-wrap gap-1">
      {PATH.map((s, i) => (
        <li key={s} aria-current={i === at ? 'step' : undefined}
          className={`rounded-full px-3 py-1 text-sm font-semibold ${i < at ? 'bg-spruce-700 text-white' : i === at ? 'bg-copper-600 text-white' : 'bg-spruce-100 text-ink-soft'}`}>
          {i < at ? '✓ ' : ''}{i < at && s === 'awaiting_payment' ? 'Ordered' : ORDER_STATE_LABELS[s]}
        </li>
      ))}
    </ol>
  );
}

/** Customers may cancel before the build starts; from paid on that is a refund. */
export const CANCELLABLE: OrderState[] = ['awaiting_payment', 'paid', 'scheduled'];
