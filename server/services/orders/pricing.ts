import type { Knex } from 'knex';
import type { PricedLine, Quote, QuoteInput } from '../../../shared/schemas/orders';
import { taxedAmount } from '../../../shared/tax/amounts';
import { taxRuleFor } from '../../../shared/tax/destination';
import { EU_STANDARD_VAT } from '../../../shared/tax/vat-rates';

export type { PricedLine, Quote };
import { invalid } from '../../errors';
import { getSettings, shippingZoneFor } from '../settings';

/** The destination a quote is for: `country`, else the shipping address's, else the shop's home country. */
export function quoteCountry(input: QuoteInput, homeCountry: string): { country: string; field: string } {
  if (input.country) return { country: input.country, field: 'country' };
  if (input.shipping?.country) return { country: input.shipping.country, field: 'shipping.country' };
  return { country: homeCountry, field: 'country' };
}

/**
 * Prices a cart for a destination from the catalog, the settings and the shipping zones only:
 * whatever amounts a client sends are never read. Unit price = model base price + option
 * surcharge; shipping from the destination's zone, once per order; VAT by destination
 * (shared/tax/destination.ts), per line on the net amount (shared/tax/amounts.ts).
 */
export async function priceCart(knex: Knex | Knex.Transaction, input: QuoteInput): Promise<Quote> {
  const settings = await getSettings(knex);
  const { country, field } = quoteCountry(input, settings.home_country);
  const zone = await shippingZoneFor(knex, country);
  const fields: Record<string, string> = {};
  if (!zone) fields[field] = `We do not ship to ${country}`;
  const rule = taxRuleFor({ homeCountry: settings.home_country, ossOverThreshold: settings.oss_over_threshold }, country);
  const basis = { pricesIncludeTax: settings.prices_include_tax, homeRateBasisPoints: EU_STANDARD_VAT[settings.home_country].basisPoints };
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
    const amount = taxedAmount(unitPriceCents * line.quantity, basis, rule.rateBasisPoints);
    lines.push({
      modelId: line.modelId, optionId: line.optionId, quantity: line.quantity, unitPriceCents,
      netCents: amount.netCents, taxRateBasisPoints: rule.rateBasisPoints, taxCents: amount.taxCents, lineTotalCents: amount.grossCents,
      description: `${row.model_name} — ${row.option_name}`,
    });
  }
  if (Object.keys(fields).length > 0) throw invalid(zone ? 'Some items in the cart cannot be ordered' : `We do not ship to ${country}`, fields);
  const shipping = taxedAmount(zone!.rateCents, basis, rule.rateBasisPoints);
  const subtotalCents = lines.reduce((sum, l) => sum + l.lineTotalCents, 0);
  return {
    currency: settings.currency, country, lines, subtotalCents,
    shippingZone: zone!.name, shippingCents: shipping.grossCents, shippingNetCents: shipping.netCents, shippingTaxCents: shipping.taxCents,
    netCents: lines.reduce((sum, l) => sum + l.netCents, 0) + shipping.netCents,
    taxCents: lines.reduce((sum, l) => sum + l.taxCents, 0) + shipping.taxCents,
    totalCents: subtotalCents + shipping.grossCents,
    pricesIncludeTax: settings.prices_include_tax, taxRateBasisPoints: rule.rateBasisPoints, taxRegime: rule.regime, taxNote: rule.note,
  };
}
