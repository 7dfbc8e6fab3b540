import type { Knex } from 'knex';

// Order numbers come from a sequence so two checkouts at the same moment never share one,
// and a number is never reused even when an order is cancelled.
export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE SEQUENCE order_number_seq START WITH 10001');
  // The staff orders table filters by option and searches; these keep that quick.
  await knex.raw('CREATE INDEX order_lines_option_idx ON order_lines (option_id)');
  await knex.raw('CREATE INDEX orders_created_at_idx ON orders (created_at)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX orders_created_at_idx');
  await knex.raw('DROP INDEX order_lines_option_idx');
  await knex.raw('DROP SEQUENCE order_number_seq');
}
