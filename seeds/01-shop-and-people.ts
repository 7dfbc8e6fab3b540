import type { Knex } from 'knex';
import { hashPassword } from '../server/services/users';

// The demo scenario: an invented shop and invented people. Idempotent: running it again
// leaves existing rows (and any password someone changed) as they are.
export const DEMO_PASSWORD = 'kneepoint-demo';

export const DEMO_PEOPLE = [
  { email: 'owner@shop.example', name: 'Maren Holt', role: 'owner' },
  { email: 'planner@shop.example', name: 'Ravi Lindqvist', role: 'planner' },
  { email: 'assembler@shop.example', name: 'Juno Abara', role: 'assembler' },
  { email: 'tester@shop.example', name: 'Oskar Vennig', role: 'tester' },
  { email: 'customer@shop.example', name: 'Dee Castellano', role: 'customer' },
  { email: 'priya@shop.example', name: 'Priya Sorensen', role: 'assembler' },
  { email: 'lukas@shop.example', name: 'Lukas Brandt', role: 'assembler' },
  { email: 'sam@mail.example', name: 'Sam Whitlow', role: 'customer' },
] as const;

export async function seed(knex: Knex): Promise<void> {
  await knex('settings')
    .insert({
      id: 1, shop_name: 'Hollowmere Effects', shop_email: 'workshop@shop.example', currency: 'EUR', time_zone: 'Europe/Berlin', locale: 'en-GB',
      labour_cents_per_hour: 3200, shop_address: 'Kiln Yard 7 · 10999 Berlin · Germany', vat_id: 'DE000000000', public_url: 'https://hollowmere.example',
      home_country: 'DE', oss_over_threshold: true, order_number_prefix: 'HM', serial_prefix: 'HM',
    })
    .onConflict('id')
    .ignore();
  // Invented shipping rates and carriers (the carriers' sites are .example addresses).
  if (!(await knex('shipping_zones').first('id'))) {
    await knex('shipping_zones').insert([
      { name: 'Germany', countries: ['DE'], rate_cents: 590, position: 0 },
      { name: 'European Union', countries: ['AT', 'BE', 'DK', 'ES', 'FI', 'FR', 'IE', 'IT', 'LU', 'NL', 'PL', 'PT', 'SE', 'CZ'], rate_cents: 1290, position: 1 },
      { name: 'Rest of Europe', countries: ['CH', 'GB', 'NO'], rate_cents: 1990, position: 2 },
      { name: 'North America', countries: ['US', 'CA'], rate_cents: 2900, position: 3 },
    ]);
  }
  if (!(await knex('carriers').first('id'))) {
    await knex('carriers').insert([
      { name: 'Parcelway', tracking_url_template: 'https://track.parcelway.example/{tracking}', position: 0 },
      { name: 'Kestrel Post', tracking_url_template: 'https://kestrel-post.example/track?id={tracking}', position: 1 },
    ]);
  }
  const existing = new Set((await knex('users').select('email')).map((r: { email: string }) => r.email));
  const missing = DEMO_PEOPLE.filter((p) => !existing.has(p.email));
  if (missing.length === 0) return;
  const hash = await hashPassword(DEMO_PASSWORD);
  await knex('users')
    .insert(missing.map((p) => ({ ...p, password_hash: hash })))
    .onConflict('email')
    .ignore();
}
