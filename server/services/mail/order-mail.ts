import type { Knex } from 'knex';
import type { Config } from '../../config';
import { enqueueMail, type MailAttachment } from './outbox';

/** A VAT rate as mail text, e.g. "19 %" or "25.5 %" (empty when unknown). */
export const taxRateText = (basisPoints: number | null | undefined) => (basisPoints === null || basisPoints === undefined ? '' : `${basisPoints / 100} %`);

/** What every order mail shares: who, which order, where to follow it, the receipt lines and totals. */
export async function orderMailData(trx: Knex | Knex.Transaction, orderId: number, publicUrl: string) {
  const order = await trx('orders as o').join('users as u', 'u.id', 'o.customer_id').where('o.id', orderId)
    .first('o.*', 'u.name as customer_name', 'u.email as customer_email');
  const lines = await trx('order_lines').where({ order_id: orderId }).orderBy('id');
  const settings = await trx('settings').where({ id: 1 }).first('prices_include_tax');
  return {
    to: order.customer_email as string,
    data: {
      customerName: order.customer_name, orderNumber: order.number, orderUrl: `${publicUrl}/orders/${order.id}`,
      lines: lines.map((l) => ({
        description: l.description, quantity: l.quantity, unitPriceCents: l.unit_price_cents, lineTotalCents: l.line_total_cents,
        taxRate: taxRateText(l.tax_rate_basis_points ?? order.tax_rate_basis_points), taxCents: l.tax_cents,
      })),
      subtotalCents: order.subtotal_cents, shippingCents: order.shipping_cents, taxCents: order.tax_cents, totalCents: order.total_cents,
      pricesIncludeTax: Boolean(settings?.prices_include_tax), taxRate: taxRateText(order.tax_rate_basis_points), taxNote: order.tax_note ?? '',
    },
  };
}

/** Queues an order mail in the caller's transaction; `key` makes it once per event. */
export async function enqueueOrderMail(
  trx: Knex.Transaction, config: Pick<Config, 'publicUrl'>, orderId: number, template: string, key: string,
  extra: Record<string, unknown> = {}, attachments: MailAttachment[] = [],
) {
  const { to, data } = await orderMailData(trx, orderId, config.publicUrl);
  return enqueueMail(trx, { dedupeKey: `${template}:${key}`, template, to, data: { ...data, ...extra }, attachments });
}
