import type { Knex } from 'knex';

export interface ShopSettings {
  shop_name: string;
  shop_email: string;
  shop_address: string;
  currency: string;
  time_zone: string;
  labour_cents_per_hour: number;
  shipping_cents: number;
  tax_rate_basis_points: number;
  prices_include_tax: boolean;
  vf_test_current_ma: number;
  thd_tolerance_percent: number;
  paper_size: 'A4' | 'Letter';
  sheet_staff_names: 'names' | 'initials';
  serial_prefix: string;
}

/** The shop's one settings row (seeded). */
export async function getSettings(knex: Knex | Knex.Transaction): Promise<ShopSettings> {
  const row = await knex('settings').where({ id: 1 }).first();
  if (!row) throw new Error('The settings row is missing: run the seeds.');
  return row as ShopSettings;
}

/** What anyone may know: name, currency, time zone (the client formats money and dates with these). */
export async function getPublicSettings(knex: Knex) {
  const s = await getSettings(knex);
  return { shopName: s.shop_name, shopEmail: s.shop_email, currency: s.currency, timeZone: s.time_zone };
}
