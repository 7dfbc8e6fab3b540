import type { Knex } from 'knex';

// Unsold finished units by option: the shipping desk asks, for each paid line, whether the shelf
// holds at least its quantity of that option, and stops counting there. Without a key on the option
// PostgreSQL walks every unsold unit for each line, so the check grew with the stock on the shelf.
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE INDEX units_unsold_by_option_idx ON units (option_id) WHERE state = 'in_stock' AND order_id IS NULL`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS units_unsold_by_option_idx');
}
