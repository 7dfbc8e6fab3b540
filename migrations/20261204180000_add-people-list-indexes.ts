import type { Knex } from 'knex';

// The people list is sorted by name by default, over every account the shop ever had (customers
// grow with the order history). These indexes give its first page in name order without sorting
// them all: every account, and customers only (or any one role). Staff only are a few rows, which
// the planner already finds through users_active_role_idx and sorts.
// The descending order reads the same indexes backwards (name DESC NULLS FIRST, id DESC).
export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE INDEX users_name_id_idx ON users (name, id)');
  await knex.raw('CREATE INDEX users_role_name_id_idx ON users (role, name, id)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS users_role_name_id_idx');
  await knex.raw('DROP INDEX IF EXISTS users_name_id_idx');
}
