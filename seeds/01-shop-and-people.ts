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
    .insert({ id: 1, shop_name: 'Hollowmere Effects', shop_email: 'workshop@shop.example', currency: 'EUR', time_zone: 'Europe/Berlin', labour_cents_per_hour: 3200, shop_address: 'Hollowmere Effects · Kiln Yard 7 · 10999 Berlin · workshop@shop.example' })
    .onConflict('id')
    .ignore();
  const existing = new Set((await knex('users').select('email')).map((r: { email: string }) => r.email));
  const missing = DEMO_PEOPLE.filter((p) => !existing.has(p.email));
  if (missing.length === 0) return;
  const hash = await hashPassword(DEMO_PASSWORD);
  await knex('users')
    .insert(missing.map((p) => ({ ...p, password_hash: hash })))
    .onConflict('email')
    .ignore();
}
