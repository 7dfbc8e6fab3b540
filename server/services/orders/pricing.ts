import type { Knex } from 'knex';
import type { PricedLine, Quote, QuoteInput } from '../../../shared/schemas/orders';

export type { PricedLine, Quote };
import { invalid } from '../../errors';
import { getSettings } from '../settings';

/**
 * Prices a cart from the catalog and the settings row only: whatever amounts a client sends are
 * never read. Unit price = model base price + option surcharge; shipping once per order; tax is
 * either contained in the prices (shown as the included share) or added on top.
 */
export async function priceCart(knex: Knex | Knex.Transaction, input: QuoteInput): Promise<Quote> {
  const settings = await getSettings(knex);
  const fields: Record<string, string> = {};
  const lines: PricedLine[] = [];
  for (const [i, line] of input.lines.entries()) {
    const row = await knex('clipping_options as o')
      .join('models as m', 'm.id', 'o.model_id')
      .where({ 'o.id': line.optionId, 'm.id': line.modelId, 'o.published': true, 'm.published': true })
      .first('m.name as model_name', 'm.base_price_cents', 'o.name as option_name', 'o.price_surcharge_cents');
    if (!row) {
      fields[`lines.${i}.optionId`] = 'This pedal or clipping option is not on sale';
      continue;
    }
    const unitPriceCents = row.base_price_cents + row.price_surcharge_cents;
    lines.push({
      modelId: line.modelId, optionId: line.optionId, quantity: line.quantity, unitPriceCents,
      lineTotalCents: unitPriceCents * line.quantity, description: `${row.model_name} — ${row.option_name}`,
    });
  }
  if (Object.keys(fields).length > 0) throw invalid('Some items in the cart cannot be ordered', fields);
  const subtotalCents = lines.reduce((sum, l) => sum + l.lineTotalCents, 0);
  const shippingCents = settings.shipping_cents;
  const rate = settings.tax_rate_basis_points;
  const taxable = subtotalCents + shippingCents;
  const taxCents = settings.prices_include_tax
    ? Math.round((taxable * rate) / (10_000 + rate))
    : Math.round((taxable * rate) / 10_000);
  const totalCents = settings.prices_include_tax ? taxable : taxable + taxCents;
  return {
    currency: settings.currency, lines, subtotalCents, shippingCents, taxCents, totalCents,
    pricesIncludeTax: settings.prices_include_tax, taxRateBasisPoints: rate,
  };
}
