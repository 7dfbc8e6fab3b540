import type { Knex } from 'knex';

// Indexes for the reads that grew with the shop's history on the board and the shipping desk:
// - finished stock (units not on an order that passed or sit in stock): the shipping desk takes the
//   newest of each state and counts in-stock units per option from the index alone (the planner
//   underestimates these rows, since a unit in stock is one without an order, so they are covered);
// - active staff by role (the board's work per assembler), not a scan of every customer account;
// - a batch's movements per part with the columns the board sums, so reservations and consumption
//   come from the index (replaces the plain (batch_id, part_id) index, which it covers).
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE INDEX units_unordered_finished_idx ON units (state, id) INCLUDE (option_id, batch_id, serial)
    WHERE order_id IS NULL AND state IN ('passed', 'in_stock')`);
  await knex.raw('CREATE INDEX users_active_role_idx ON users (role, name) WHERE active');
  await knex.raw('CREATE INDEX stock_movements_batch_part_idx ON stock_movements (batch_id, part_id) INCLUDE (kind, quantity, reserved_delta) WHERE batch_id IS NOT NULL');
  await knex.raw('DROP INDEX IF EXISTS stock_movements_batch_idx');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('CREATE INDEX IF NOT EXISTS stock_movements_batch_idx ON stock_movements (batch_id, part_id)');
  await knex.raw('DROP INDEX IF EXISTS stock_movements_batch_part_idx');
  await knex.raw('DROP INDEX IF EXISTS users_active_role_idx');
  await knex.raw('DROP INDEX IF EXISTS units_unordered_finished_idx');
}
