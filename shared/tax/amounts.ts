// Net, tax and gross of one amount from the catalog, in integer cents. The catalog's prices either
// include the home country's VAT (then the net is the price without it) or are net. The tax due is
// the order's rate on the net; at the home rate a tax-inclusive price is kept to the cent.

export interface TaxedAmount {
  netCents: number;
  taxCents: number;
  grossCents: number;
}

export interface PriceBasis {
  pricesIncludeTax: boolean;
  homeRateBasisPoints: number;
}

export function taxedAmount(catalogCents: number, basis: PriceBasis, rateBasisPoints: number): TaxedAmount {
  if (!basis.pricesIncludeTax) {
    const taxCents = Math.round((catalogCents * rateBasisPoints) / 10_000);
    return { netCents: catalogCents, taxCents, grossCents: catalogCents + taxCents };
  }
  const netCents = Math.round((catalogCents * 10_000) / (10_000 + basis.homeRateBasisPoints));
  const taxCents = rateBasisPoints === basis.homeRateBasisPoints ? catalogCents - netCents : Math.round((netCents * rateBasisPoints) / 10_000);
  return { netCents, taxCents, grossCents: netCents + taxCents };
}
