import { EU_STANDARD_VAT, isEuCountry } from './vat-rates';

// Which VAT applies to a sale of goods from a shop established in an EU country to a consumer,
// by where the goods are sent. The one place for this rule: the quote, the order and the invoice
// all call it.
//  - home country: the home country's standard rate;
//  - another EU country: the destination's standard rate when the shop is over the EU-wide
//    distance-selling threshold (and declares it through the one-stop shop), else the home rate;
//  - outside the EU: an export, zero-rated, with a note on the invoice.

export type TaxRegime = 'domestic' | 'eu-destination' | 'eu-home-rate' | 'export';

export interface TaxRule {
  regime: TaxRegime;
  rateBasisPoints: number;
  /** The destination country whose rate applies (or the home country). */
  rateCountry: string;
  /** A sentence for the invoice and the cart; empty for domestic sales. */
  note: string;
}

export interface TaxSettings {
  homeCountry: string;
  ossOverThreshold: boolean;
}

function rateOf(country: string): number {
  const rate = EU_STANDARD_VAT[country];
  if (!rate) throw new Error(`No VAT rate for ${country}`);
  return rate.basisPoints;
}

export function taxRuleFor(settings: TaxSettings, destination: string): TaxRule {
  const home = settings.homeCountry;
  const dest = destination.toUpperCase();
  if (dest === home) return { regime: 'domestic', rateBasisPoints: rateOf(home), rateCountry: home, note: '' };
  if (isEuCountry(dest)) {
    if (settings.ossOverThreshold) {
      return { regime: 'eu-destination', rateBasisPoints: rateOf(dest), rateCountry: dest, note: `VAT at the rate of the country of destination (${dest}), declared through the EU one-stop shop.` };
    }
    return { regime: 'eu-home-rate', rateBasisPoints: rateOf(home), rateCountry: home, note: `VAT at the rate of ${home}: the shop's EU distance sales are under the threshold.` };
  }
  return { regime: 'export', rateBasisPoints: 0, rateCountry: dest, note: 'Export outside the EU: zero-rated. Import VAT and duties of the destination country may be charged on delivery.' };
}
