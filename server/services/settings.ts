import type { Knex } from 'knex';
import type { Carrier, OwnerSettings, PublicSettings, SettingsChange, SettingsPatch, ShippingZone } from '../../shared/schemas/settings';
import { invalid, notFound } from '../errors';
import { imageTypeOf } from './image-type';

// The shop's settings: the one settings row, the shipping zones and the carriers. Other services
// read them through getSettings / getCarriers / shippingZoneFor; only updateSettings writes them,
// and it records every change (who, when, old → new) in settings_audit.

export interface ShopSettings {
  shop_name: string;
  shop_email: string;
  shop_address: string;
  vat_id: string;
  logo_file_id: number | null;
  public_url: string;
  currency: string;
  time_zone: string;
  locale: string;
  labour_cents_per_hour: number;
  prices_include_tax: boolean;
  home_country: string;
  oss_over_threshold: boolean;
  vf_test_current_ma: number;
  thd_tolerance_percent: number;
  max_current_draw_ma: number;
  fast_step_percent: number;
  /** ± dB on each harmonic's level at the bench test. */
  harmonic_tolerance_db: number;
  paper_size: 'A4' | 'Letter';
  sheet_staff_names: 'names' | 'initials';
  serial_prefix: string;
  order_number_prefix: string;
  updated_at: Date;
}

type Db = Knex | Knex.Transaction;

/** The shop's one settings row (seeded). */
export async function getSettings(knex: Db): Promise<ShopSettings> {
  const row = await knex('settings').where({ id: 1 }).first();
  if (!row) throw new Error('The settings row is missing: run the seeds.');
  return row as ShopSettings;
}

const carrierOut = (r: { id: number; name: string; tracking_url_template: string; active: boolean }): Carrier =>
  ({ id: r.id, name: r.name, trackingUrlTemplate: r.tracking_url_template, active: r.active });

/** The carriers, in the owner's order; `activeOnly` for what shipping may choose from. */
export async function getCarriers(knex: Db, options: { activeOnly?: boolean } = {}): Promise<Carrier[]> {
  const q = knex('carriers').orderBy([{ column: 'position' }, { column: 'id' }]);
  if (options.activeOnly) q.where({ active: true });
  return (await q).map(carrierOut);
}

/** One carrier by id, or 404 in words. */
export async function getCarrier(knex: Db, id: number): Promise<Carrier> {
  const row = await knex('carriers').where({ id }).first();
  if (!row) throw notFound('That carrier does not exist');
  return carrierOut(row);
}

export async function getShippingZones(knex: Db): Promise<ShippingZone[]> {
  const rows = await knex('shipping_zones').orderBy([{ column: 'position' }, { column: 'id' }]);
  return rows.map((r) => ({ id: r.id, name: r.name, countries: r.countries, rateCents: r.rate_cents }));
}

/** The zone that covers a country, or null when the shop does not ship there. */
export async function shippingZoneFor(knex: Db, country: string): Promise<ShippingZone | null> {
  const zones = await getShippingZones(knex);
  return zones.find((z) => z.countries.includes(country.toUpperCase())) ?? null;
}

export const logoUrl = (s: Pick<ShopSettings, 'logo_file_id'>) => (s.logo_file_id ? `/api/settings/logo?v=${s.logo_file_id}` : null);

/** What anyone may know: identity, formatting, and where the shop ships (the client formats and the cart offers these). */
export async function getPublicSettings(knex: Db): Promise<PublicSettings> {
  const [s, zones] = await Promise.all([getSettings(knex), getShippingZones(knex)]);
  return {
    shopName: s.shop_name, shopEmail: s.shop_email, shopAddress: s.shop_address, vatId: s.vat_id, publicUrl: s.public_url,
    logoUrl: logoUrl(s), currency: s.currency, timeZone: s.time_zone, locale: s.locale, homeCountry: s.home_country,
    pricesIncludeTax: s.prices_include_tax, shippingCountries: [...new Set(zones.flatMap((z) => z.countries))].sort(),
  };
}

// API field → settings column, for the fields that live on the settings row.
const COLUMNS = {
  shopName: 'shop_name', shopEmail: 'shop_email', shopAddress: 'shop_address', vatId: 'vat_id', publicUrl: 'public_url',
  serialPrefix: 'serial_prefix', orderNumberPrefix: 'order_number_prefix', timeZone: 'time_zone', locale: 'locale',
  labourCentsPerHour: 'labour_cents_per_hour', homeCountry: 'home_country', ossOverThreshold: 'oss_over_threshold',
  pricesIncludeTax: 'prices_include_tax', vfTestCurrentMa: 'vf_test_current_ma', thdTolerancePercent: 'thd_tolerance_percent', harmonicToleranceDb: 'harmonic_tolerance_db',
  maxCurrentDrawMa: 'max_current_draw_ma', fastStepPercent: 'fast_step_percent', paperSize: 'paper_size', sheetStaffNames: 'sheet_staff_names',
} as const satisfies Partial<Record<keyof SettingsPatch, keyof ShopSettings>>;
type RowField = keyof typeof COLUMNS;

async function settingsView(knex: Db) {
  const [s, shippingZones, carriers] = await Promise.all([getSettings(knex), getShippingZones(knex), getCarriers(knex)]);
  const fields = Object.fromEntries(Object.entries(COLUMNS).map(([key, column]) => [key, s[column]])) as { [K in RowField]: ShopSettings[(typeof COLUMNS)[K]] };
  return { ...fields, currency: s.currency, shippingZones, carriers, logoUrl: logoUrl(s), updatedAt: s.updated_at.toISOString() };
}

async function recentChanges(knex: Db, limit = 30): Promise<SettingsChange[]> {
  const rows = await knex('settings_audit as a').join('users as u', 'u.id', 'a.user_id')
    .orderBy('a.id', 'desc').limit(limit)
    .select('a.id', 'a.field', 'a.old_value', 'a.new_value', 'a.changed_at', 'u.name as user_name');
  return rows.map((r) => ({ id: Number(r.id), field: r.field, oldValue: r.old_value, newValue: r.new_value, changedAt: new Date(r.changed_at).toISOString(), userName: r.user_name }));
}

/** GET /api/settings: everything the owner can change, and the latest changes. */
export async function getOwnerSettings(knex: Db): Promise<OwnerSettings> {
  const [view, changes] = await Promise.all([settingsView(knex), recentChanges(knex)]);
  return { ...view, changes };
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/**
 * Applies a PATCH in one transaction under the settings row's lock and writes one audit row per
 * field whose value changed, holding the old and the new value. Zones are replaced whole; carriers
 * are kept by id (shipments refer to them), so a carrier left out of the list is made inactive.
 */
export async function updateSettings(knex: Knex, userId: number, patch: SettingsPatch): Promise<OwnerSettings> {
  await knex.transaction(async (trx) => {
    await trx('settings').where({ id: 1 }).forUpdate().first('id');
    const before = await settingsView(trx);
    const audit: { user_id: number; field: string; old_value: string; new_value: string }[] = [];
    const note = (field: string, oldValue: unknown, newValue: unknown) => {
      if (!same(oldValue, newValue)) audit.push({ user_id: userId, field, old_value: JSON.stringify(oldValue), new_value: JSON.stringify(newValue) });
    };

    const row: Record<string, unknown> = {};
    for (const [key, column] of Object.entries(COLUMNS) as [RowField, string][]) {
      const value = patch[key];
      if (value === undefined) continue;
      row[column] = value;
      note(key, before[key], value);
    }
    if (Object.keys(row).length > 0) await trx('settings').where({ id: 1 }).update({ ...row, updated_at: trx.fn.now() });

    if (patch.shippingZones) {
      const zones = patch.shippingZones.map((z, position) => ({ name: z.name, countries: [...new Set(z.countries)], rate_cents: z.rateCents, position }));
      note('shippingZones', before.shippingZones.map(({ name, countries, rateCents }) => ({ name, countries, rateCents })),
        zones.map((z) => ({ name: z.name, countries: z.countries, rateCents: z.rate_cents })));
      await trx('shipping_zones').del();
      await trx('shipping_zones').insert(zones);
    }

    if (patch.carriers) {
      const known = new Map(before.carriers.map((c) => [c.id, c]));
      const kept = new Set<number>();
      for (const [position, c] of patch.carriers.entries()) {
        const values = { name: c.name, tracking_url_template: c.trackingUrlTemplate, active: c.active, position };
        if (c.id !== undefined) {
          if (!known.has(c.id)) throw notFound(`Carrier ${c.id} does not exist`);
          kept.add(c.id);
          await trx('carriers').where({ id: c.id }).update(values);
        } else {
          await trx('carriers').insert(values);
        }
      }
      const dropped = before.carriers.filter((c) => !kept.has(c.id) && c.active).map((c) => c.id);
      if (dropped.length) await trx('carriers').whereIn('id', dropped).update({ active: false });
      const after = await getCarriers(trx);
      note('carriers', before.carriers, after);
    }

    if (audit.length) await trx('settings_audit').insert(audit);
  });
  return getOwnerSettings(knex);
}

export const LOGO_MAX_BYTES = 512 * 1024;

/** Replaces the logo (PNG or JPEG by its own bytes: PDFs embed only those) and audits the change. */
export async function setLogo(knex: Knex, userId: number, file: Express.Multer.File | undefined) {
  if (!file) throw invalid('Choose a logo file', { logo: 'No file was uploaded' });
  const type = await imageTypeOf(file.buffer);
  if (type !== 'image/png' && type !== 'image/jpeg') throw invalid('The logo must be a PNG or JPEG image', { logo: 'Not a PNG or JPEG image' });
  const filename = file.originalname.slice(0, 200) || 'logo';
  await knex.transaction(async (trx) => {
    const before = await trx('settings').where({ id: 1 }).forUpdate().first('logo_file_id');
    const [row] = await trx('files').insert({ purpose: 'shop-logo', filename, content_type: type, size_bytes: file.size, data: file.buffer, uploaded_by: userId }).returning('id');
    await trx('settings').where({ id: 1 }).update({ logo_file_id: row.id, updated_at: trx.fn.now() });
    await trx('settings_audit').insert({ user_id: userId, field: 'logo', old_value: JSON.stringify(before?.logo_file_id ? { fileId: before.logo_file_id } : null), new_value: JSON.stringify({ fileId: row.id, filename }) });
    if (before?.logo_file_id) await trx('files').where({ id: before.logo_file_id }).del();
  });
  return getOwnerSettings(knex);
}

/** Removes the logo (the shop's name stands alone on documents); audited. */
export async function removeLogo(knex: Knex, userId: number) {
  await knex.transaction(async (trx) => {
    const before = await trx('settings').where({ id: 1 }).forUpdate().first('logo_file_id');
    if (!before?.logo_file_id) return;
    await trx('settings').where({ id: 1 }).update({ logo_file_id: null, updated_at: trx.fn.now() });
    await trx('settings_audit').insert({ user_id: userId, field: 'logo', old_value: JSON.stringify({ fileId: before.logo_file_id }), new_value: JSON.stringify(null) });
    await trx('files').where({ id: before.logo_file_id }).del();
  });
  return getOwnerSettings(knex);
}

/** The logo file, or null when the shop has none. */
export async function getLogo(knex: Db): Promise<{ contentType: string; data: Buffer } | null> {
  const s = await getSettings(knex);
  if (!s.logo_file_id) return null;
  const file = await knex('files').where({ id: s.logo_file_id }).first('content_type', 'data');
  return file ? { contentType: file.content_type, data: file.data } : null;
}
