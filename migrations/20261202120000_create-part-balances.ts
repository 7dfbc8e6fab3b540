import type { Knex } from 'knex';

// A stored balance per part beside the stock ledger. The ledger service (server/services/stock/ledger.ts)
// moves it in the same transaction as every movement, under the part's row lock; the ledger stays the
// truth (`npm run stock:check` compares the two). part_stock keeps its name and columns but reads the
// balance instead of re-summing every movement on each use. The rows are filled by the next migration.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('part_balances', (t) => {
    t.integer('part_id').primary().references('parts.id').onDelete('CASCADE');
    t.integer('on_hand').notNullable().defaultTo(0);
    t.integer('reserved').notNullable().defaultTo(0);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`CREATE OR REPLACE VIEW part_stock AS
    SELECT p.id AS part_id,
           COALESCE(b.on_hand, 0)::int AS on_hand,
           COALESCE(b.reserved, 0)::int AS reserved,
           (COALESCE(b.on_hand, 0) - COALESCE(b.reserved, 0))::int AS available
    FROM parts p LEFT JOIN part_balances b ON b.part_id = p.id`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`CREATE OR REPLACE VIEW part_stock AS
    SELECT p.id AS part_id,
           COALESCE(SUM(m.on_hand_delta), 0)::int AS on_hand,
           COALESCE(SUM(m.reserved_delta), 0)::int AS reserved,
           (COALESCE(SUM(m.on_hand_delta), 0) - COALESCE(SUM(m.reserved_delta), 0))::int AS available
    FROM parts p LEFT JOIN stock_movements m ON m.part_id = p.id
    GROUP BY p.id`);
  await knex.schema.dropTable('part_balances');
}
