import { z } from 'zod';
import { dateSchema, id, str } from './common';
import { ORDER_STATES } from '../order-states';
import { listQuery } from './list';
import type { TaxRegime } from '../tax/destination';

// One schema per request shape for ordering: the cart and checkout forms and the server share them.
// Prices are deliberately absent: the server computes every amount from the catalog and settings.

export const orderLineSchema = z.object({
  modelId: id('Choose a pedal'),
  optionId: id('Choose a clipping option'),
  quantity: z.coerce.number().int('Enter a whole number').min(1, 'At least 1').max(20, 'At most 20 of one pedal per order'),
});
export type OrderLineInput = z.infer<typeof orderLineSchema>;

export const shippingAddressSchema = z.object({
  name: str().trim().min(1, 'Enter the name to ship to').max(120, 'Use at most 120 characters'),
  line1: str().trim().min(1, 'Enter the street and number').max(160, 'Use at most 160 characters'),
  line2: str().trim().max(160, 'Use at most 160 characters').default(''),
  city: str().trim().min(1, 'Enter the town or city').max(80, 'Use at most 80 characters'),
  postcode: str().trim().min(2, 'Enter the postcode').max(20, 'Use at most 20 characters')
    .regex(/^[A-Za-z0-9 -]+$/, 'Use letters, digits, spaces and dashes only'),
  country: str().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Choose a country (two-letter code, e.g. DE)'),
  phone: str().trim().max(40, 'Use at most 40 characters').regex(/^[0-9 +()/-]*$/, 'Use digits, spaces and + ( ) / - only').default(''),
});
export type ShippingAddressInput = z.infer<typeof shippingAddressSchema>;

const cartLinesSchema = z.array(orderLineSchema).min(1, 'The cart is empty').max(10, 'At most 10 different pedals per order');
const countryCode = str().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Choose a country (two-letter code, e.g. DE)');

/**
 * A quote for the cart, for a destination: `country`, or the country of a (partial) shipping
 * address; without either, the shop's home country. Tax and shipping depend on it.
 */
export const quoteSchema = z.object({
  lines: cartLinesSchema,
  country: countryCode.optional(),
  shipping: z.object({ country: countryCode.optional() }).optional(),
});
export type QuoteInput = z.infer<typeof quoteSchema>;

export const placeOrderSchema = z.object({ lines: cartLinesSchema, shipping: shippingAddressSchema });
export type PlaceOrderInput = z.infer<typeof placeOrderSchema>;

/** The order desk's list: sortable columns and filters (paging and `q` come from listQuery). */
export const ORDER_SORT_KEYS = ['createdAt', 'number', 'state', 'totalCents', 'customerName'] as const;
export const orderFilterSchema = listQuery(ORDER_SORT_KEYS, { sort: 'createdAt', dir: 'desc' }, {
  state: z.enum(ORDER_STATES, { message: 'Choose a status from the list' }).optional(),
  optionId: id('Not a valid option id').optional(),
  from: dateSchema('2026-12-01').optional(),
  to: dateSchema('2026-12-01').optional(),
});
export type OrderFilter = z.infer<typeof orderFilterSchema>;

/** A customer's own orders, newest first, a page at a time (five years of orders add up). */
export const myOrdersSchema = listQuery(['createdAt', 'number', 'totalCents'] as const, { sort: 'createdAt', dir: 'desc', pageSize: 10 }, {
  state: z.enum(ORDER_STATES, { message: 'Choose a status from the list' }).optional(),
});
export type MyOrdersQuery = z.infer<typeof myOrdersSchema>;

export const orderNoteSchema = z.object({
  note: str().trim().min(1, 'Write the note first').max(2000, 'Use at most 2000 characters'),
});
export type OrderNoteInput = z.infer<typeof orderNoteSchema>;

/** The one hand-made state change staff make here; production and payments move the rest. */
export const markDeliveredSchema = z.object({
  message: str().trim().max(300).default(''),
});
export type MarkDeliveredInput = z.infer<typeof markDeliveredSchema>;

/** A priced cart, as the server computes it (the client only displays it). */
export interface PricedLine {
  modelId: number;
  optionId: number;
  quantity: number;
  /** The catalog price of one unit (with the home country's VAT when prices include tax). */
  unitPriceCents: number;
  netCents: number;
  taxRateBasisPoints: number;
  taxCents: number;
  /** What the customer pays for the line: net + tax. */
  lineTotalCents: number;
  description: string;
}

export type { TaxRegime };

export interface Quote {
  currency: string;
  /** The destination the quote is for (ISO 3166-1 alpha-2). */
  country: string;
  lines: PricedLine[];
  /** Σ lineTotalCents. */
  subtotalCents: number;
  shippingZone: string;
  /** Shipping as paid (net + tax). */
  shippingCents: number;
  shippingNetCents: number;
  shippingTaxCents: number;
  /** Σ net of lines and shipping. */
  netCents: number;
  taxCents: number;
  /** subtotal + shipping. */
  totalCents: number;
  pricesIncludeTax: boolean;
  taxRateBasisPoints: number;
  taxRegime: TaxRegime;
  /** Why this rate (one-stop shop, export): empty for domestic sales. */
  taxNote: string;
}
