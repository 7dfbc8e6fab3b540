import type { Knex } from 'knex';

// Recent shipments are listed newest first, a page at a time, out of every shipment ever made.
export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE INDEX IF NOT EXISTS shipments_shipped_at_idx ON shipments (shipped_at)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS shipments_shipped_at_idx');
}
