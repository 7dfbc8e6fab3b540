import { z } from 'zod';
import { isUsableLocale, isUsableTimeZone } from '../format';
import { id, str, text } from './common';
import { isEuCountry } from '../tax/vat-rates';

// The owner's settings: one schema for the settings form and for PATCH /api/settings (every field
// optional there: a PATCH changes only what it names). Money is in integer cents.

export const PAPER_SIZES = ['A4', 'Letter'] as const;
export const STAFF_NAME_STYLES = ['names', 'initials'] as const;
/** The placeholder a carrier's tracking-URL template must contain. */
export const TRACKING_PLACEHOLDER = '{tracking}';

/** The tracking link for a parcel: the template with the tracking number put in its place, URL-encoded. */
export function trackingUrl(template: string, tracking: string): string {
  return template.split(TRACKING_PLACEHOLDER).join(encodeURIComponent(tracking.trim()));
}

const country = str().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. DE');

const isBcp47 = isUsableLocale;

const isTimeZone = isUsableTimeZone;

const httpsUrl = (message: string) => str().trim().max(300, 'Use at most 300 characters').refine((value) => {
  try {
    const url = new URL(value.split(TRACKING_PLACEHOLDER).join('TRACKING'));
    return url.protocol === 'https:' || url.protocol === 'http:';
  } catch {
    return false;
  }
}, message);

const prefix = (what: string) => str().trim().toUpperCase().regex(/^[A-Z]{1,6}$/, `Use 1 to 6 letters for the ${what} prefix, e.g. HM`);

export const shippingZoneSchema = z.object({
  id: id('Not a valid zone id').optional(),
  name: text(60).min(1, 'Name the zone'),
  countries: z.array(country, { error: 'List the countries of this zone' }).min(1, 'Add at least one country').max(250),
  rateCents: z.coerce.number({ error: 'Enter the rate' }).int('Enter whole cents').min(0, 'The rate cannot be negative').max(1_000_000, 'At most 10,000.00'),
});
export type ShippingZoneInput = z.infer<typeof shippingZoneSchema>;

export const carrierSchema = z.object({
  id: id('Not a valid carrier id').optional(),
  name: text(60).min(1, 'Name the carrier'),
  trackingUrlTemplate: httpsUrl('Enter a web address starting with https://')
    .refine((v) => v.includes(TRACKING_PLACEHOLDER), `Put ${TRACKING_PLACEHOLDER} where the tracking number goes`),
  active: z.boolean({ error: 'Choose yes or no' }).default(true),
});
export type CarrierInput = z.infer<typeof carrierSchema>;

export const settingsSchema = z.object({
  shopName: text(120).min(1, 'Enter the shop’s name'),
  shopEmail: str().trim().toLowerCase().email('Enter a valid e-mail address').max(200, 'Use at most 200 characters'),
  shopAddress: text(300).min(1, 'Enter the shop’s postal address'),
  vatId: str().trim().toUpperCase().max(20, 'Use at most 20 characters')
    .regex(/^$|^[A-Z]{2}[0-9A-Z+*]{2,13}$/, 'A VAT id is a country code and 2 to 13 letters or digits, e.g. DE123456789'),
  publicUrl: z.union([z.literal(''), httpsUrl('Enter the shop’s web address, e.g. https://shop.example')]),
  serialPrefix: prefix('serial'),
  orderNumberPrefix: prefix('order-number'),
  timeZone: str().trim().refine(isTimeZone, 'Use a time zone name such as Europe/Berlin'),
  locale: str().trim().max(35).refine(isBcp47, 'Use a language tag such as en-GB or de-DE'),
  labourCentsPerHour: z.coerce.number().int('Enter whole cents').min(0, 'Cannot be negative').max(1_000_000, 'At most 10,000.00 an hour'),
  homeCountry: country.refine(isEuCountry, 'The tax rules are for a shop established in an EU country: choose one'),
  ossOverThreshold: z.boolean({ error: 'Choose yes or no' }),
  pricesIncludeTax: z.boolean({ error: 'Choose yes or no' }),
  shippingZones: z.array(shippingZoneSchema).min(1, 'Add at least one shipping zone').max(30, 'At most 30 zones')
    .superRefine((zones, ctx) => {
      const seen = new Map<string, number>();
      zones.forEach((zone, i) => zone.countries.forEach((c, j) => {
        if (seen.has(c)) ctx.addIssue({ code: 'custom', path: [i, 'countries', j], message: `${c} is already in zone ${seen.get(c)! + 1}` });
        else seen.set(c, i);
      }));
    }),
  vfTestCurrentMa: z.coerce.number({ error: 'Enter the current in mA' }).min(0.01, 'At least 0.01 mA').max(50, 'At most 50 mA'),
  thdTolerancePercent: z.coerce.number({ error: 'Enter a percentage' }).min(1, 'At least 1 %').max(100, 'At most 100 %'),
  harmonicToleranceDb: z.coerce.number({ error: 'Enter a level in dB' }).min(0.5, 'At least 0.5 dB').max(20, 'At most 20 dB'),
  maxCurrentDrawMa: z.coerce.number({ error: 'Enter the current in mA' }).min(1, 'At least 1 mA').max(2000, 'At most 2000 mA'),
  fastStepPercent: z.coerce.number({ error: 'Enter a percentage' }).int('Enter a whole percentage').min(0, 'At least 0 %').max(100, 'At most 100 %'),
  paperSize: z.enum(PAPER_SIZES, { error: 'Choose A4 or Letter' }),
  sheetStaffNames: z.enum(STAFF_NAME_STYLES, { error: 'Choose names or initials' }),
  carriers: z.array(carrierSchema).max(20, 'At most 20 carriers').superRefine((carriers, ctx) => {
    const seen = new Set<string>();
    carriers.forEach((c, i) => {
      const key = c.name.toLowerCase();
      if (seen.has(key)) ctx.addIssue({ code: 'custom', path: [i, 'name'], message: 'Another carrier has this name' });
      seen.add(key);
    });
  }),
});
export type SettingsInput = z.infer<typeof settingsSchema>;
export type SettingsForm = z.input<typeof settingsSchema>;

/** PATCH /api/settings: any of the fields above; at least one. Lists (zones, carriers) are sent whole. */
export const settingsPatchSchema = settingsSchema.partial().refine((patch) => Object.keys(patch).length > 0, 'Change at least one setting');
export type SettingsPatch = z.infer<typeof settingsPatchSchema>;

export interface Carrier {
  id: number;
  name: string;
  trackingUrlTemplate: string;
  active: boolean;
}

export interface ShippingZone {
  id: number;
  name: string;
  countries: string[];
  rateCents: number;
}

/** GET /api/settings (owner only). */
export interface OwnerSettings extends Omit<SettingsInput, 'shippingZones' | 'carriers'> {
  currency: string;
  shippingZones: ShippingZone[];
  carriers: Carrier[];
  logoUrl: string | null;
  updatedAt: string;
  changes: SettingsChange[];
}

export interface SettingsChange {
  id: number;
  field: string;
  oldValue: unknown;
  newValue: unknown;
  changedAt: string;
  userName: string;
}

/** GET /api/settings/public: what any visitor may see. */
export interface PublicSettings {
  shopName: string;
  shopEmail: string;
  shopAddress: string;
  vatId: string;
  publicUrl: string;
  logoUrl: string | null;
  currency: string;
  timeZone: string;
  locale: string;
  homeCountry: string;
  pricesIncludeTax: boolean;
  /** Every country some shipping zone covers, sorted: the cart offers these. */
  shippingCountries: string[];
}
