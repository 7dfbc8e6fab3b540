// Standard VAT rates of the EU member states, as data: the one table the tax rules read.
//
// Source to check against: European Commission, "VAT rates applied in the Member States of the
// European Union" (Taxation and Customs Union, published and updated by the Commission), and the
// Commission's "Taxes in Europe" database. Read on: NOT read — these values were written from
// memory (rates in force in mid-2025, including Finland 25.5 % from 2024-09-01, Slovakia 23 %
// from 2025-01-01, Estonia 24 % from 2025-07-01 and Romania 21 % from 2025-08-01). Every value
// below is therefore marked `fromMemory: true`; whoever checks a rate against the Commission's
// table sets `fromMemory: false` and `checkedOn` to the day they read it.
// Keys are ISO 3166-1 alpha-2 codes (Greece is GR here; the Commission writes EL).

export interface VatRate {
  basisPoints: number; // 19 % = 1900
  fromMemory: boolean;
  checkedOn: string | null; // YYYY-MM-DD the value was read from the source
}

export const VAT_RATES_SOURCE = 'European Commission, VAT rates applied in the Member States of the European Union';
export const VAT_RATES_AS_OF = '2025-08-01';

const m = (percent: number): VatRate => ({ basisPoints: Math.round(percent * 100), fromMemory: true, checkedOn: null });

export const EU_STANDARD_VAT: Readonly<Record<string, VatRate>> = {
  AT: m(20), BE: m(21), BG: m(20), CY: m(19), CZ: m(21), DE: m(19), DK: m(25), EE: m(24), ES: m(21),
  FI: m(25.5), FR: m(20), GR: m(24), HR: m(25), HU: m(27), IE: m(23), IT: m(22), LT: m(21), LU: m(17),
  LV: m(21), MT: m(18), NL: m(21), PL: m(23), PT: m(23), RO: m(21), SE: m(25), SI: m(22), SK: m(23),
};

export const EU_COUNTRIES: readonly string[] = Object.keys(EU_STANDARD_VAT).sort();

export const isEuCountry = (code: string) => Object.prototype.hasOwnProperty.call(EU_STANDARD_VAT, code);
