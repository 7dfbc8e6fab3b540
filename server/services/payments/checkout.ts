import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { conflict } from '../../errors';
import { findVisibleOrder } from '../orders/orders';
import { withProvider, type PaymentsDeps } from './client';

/**
 * Starts (or resumes) payment of an order awaiting payment through a hosted Checkout Session.
 * The session's lines are the order's stored lines; amounts come from the order row, never from
 * the client. A still-open session is reused so a second click does not create a second charge.
 */
export async function startCheckout(knex: Knex, { stripe, config }: PaymentsDeps, user: SessionUser, orderId: number) {
  const order = await findVisibleOrder(knex, user, orderId);
  if (order.customer_id !== user.id) throw conflict('Only the customer who placed an order pays for it');
  if (order.state !== 'awaiting_payment') throw conflict(`Order ${order.number} is not awaiting payment`);
  if (order.checkout_session_id) {
    const existing = await withProvider(() => stripe.checkout.sessions.retrieve(order.checkout_session_id as string));
    if (existing.status === 'open' && existing.url) return { url: existing.url };
  }
  const lines = await knex('order_lines').where({ order_id: order.id }).orderBy('id');
  const currency = order.currency.toLowerCase();
  const item = (name: string, cents: number, quantity: number) => ({ price_data: { currency, unit_amount: cents, product_data: { name } }, quantity });
  // Each line as paid (VAT of the destination included); a line whose amount does not split evenly
  // over its quantity goes as one item, so the session's total is the order's to the cent.
  const lineItems = lines.map((l) => (l.line_total_cents % l.quantity === 0
    ? item(l.description, l.line_total_cents / l.quantity, l.quantity)
    : item(`${l.quantity} × ${l.description}`, l.line_total_cents, 1)));
  lineItems.push(item('Shipping', order.shipping_cents, 1));
  const metadata = { order_id: String(order.id), order_number: order.number };
  const back = `${config.publicUrl}/orders/${order.id}`;
  const customer = await knex('users').where({ id: order.customer_id }).first('email');
  const session = await withProvider(() => stripe.checkout.sessions.create(
    {
      mode: 'payment',
      line_items: lineItems,
      success_url: `${back}?paid={CHECKOUT_SESSION_ID}`,
      cancel_url: `${back}?payment=cancelled`,
      client_reference_id: String(order.id),
      customer_email: customer?.email,
      metadata,
      payment_intent_data: { metadata },
    },
    // One session per attempt: a retried request returns the same session, and an attempt after an
    // expired session is keyed on that session, so it gets a new one.
    { idempotencyKey: `checkout-${order.id}-after-${order.checkout_session_id ?? 'none'}` },
  ));
  if (session.amount_total !== order.total_cents) throw new Error(`Checkout total ${session.amount_total} differs from order total ${order.total_cents}`);
  await knex('orders').where({ id: order.id }).update({ checkout_session_id: session.id, updated_at: knex.fn.now() });
  return { url: session.url as string };
}
