import type { Knex } from 'knex';

// Shipping now comes from the shipping zones and VAT from the destination's rate
// (shared/tax/destination.ts), so the flat shipping amount and the single tax rate go.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => {
    t.dropColumn('shipping_cents');
    t.dropColumn('tax_rate_basis_points');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => {
    t.integer('shipping_cents').notNullable().defaultTo(900);
    t.integer('tax_rate_basis_points').notNullable().defaultTo(1900);
  });
}
