import type { Knex } from 'knex';

// Data for the new settings and tax columns on an existing database:
//  - the invoice and credit-note counters start at 1;
//  - order numbers keep the prefix they had (they used the serial prefix);
//  - the countries the cart offered keep the flat shipping rate they were charged, as one zone;
//  - orders placed before VAT by destination keep the one rate they were charged, split per line.
const SHIPPED_TO = ['DE', 'AT', 'BE', 'CH', 'DK', 'ES', 'FR', 'GB', 'IE', 'IT', 'NL', 'NO', 'PL', 'SE'];

export async function up(knex: Knex): Promise<void> {
  await knex('document_counters').insert([{ kind: 'invoice', next_number: 1 }, { kind: 'credit-note', next_number: 1 }]).onConflict('kind').ignore();
  const row = await knex('settings').where({ id: 1 }).first('serial_prefix', 'shipping_cents', 'tax_rate_basis_points', 'prices_include_tax');
  if (!row) return; // a fresh database: the seeds make the row and the zones
  await knex('settings').where({ id: 1 }).update({ order_number_prefix: row.serial_prefix });
  const zones = await knex('shipping_zones').count({ n: '*' }).first();
  if (Number(zones?.n ?? 0) === 0) {
    await knex('shipping_zones').insert({ name: 'Europe', countries: SHIPPED_TO, rate_cents: row.shipping_cents, position: 0 });
  }
  const rate = Number(row.tax_rate_basis_points);
  // Prices with tax included: net = gross ÷ (1 + rate), tax = the rest; else tax on top of the net amount.
  const net = (amount: string) => (row.prices_include_tax ? `round(${amount} * 10000.0 / (10000 + ${rate}))::int` : amount);
  const tax = (amount: string) => (row.prices_include_tax ? `${amount} - ${net(amount)}` : `round(${amount} * ${rate} / 10000.0)::int`);
  await knex.raw(`UPDATE order_lines SET tax_rate_basis_points = ?, net_cents = ${net('line_total_cents')},
    tax_cents = ${tax('line_total_cents')} WHERE net_cents IS NULL`, [rate]);
  await knex.raw(`UPDATE orders SET tax_rate_basis_points = ?, tax_regime = 'domestic',
    shipping_tax_cents = ${tax('shipping_cents')} WHERE tax_rate_basis_points IS NULL`, [rate]);
}

export async function down(knex: Knex): Promise<void> {
  await knex('shipping_zones').del();
  await knex('document_counters').del();
}
