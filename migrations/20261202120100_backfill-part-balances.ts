import type { Knex } from 'knex';

// Fills part_balances from the ledger: one row per part, the sum of its movements.
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    INSERT INTO part_balances (part_id, on_hand, reserved)
    SELECT p.id, COALESCE(SUM(m.on_hand_delta), 0)::int, COALESCE(SUM(m.reserved_delta), 0)::int
      FROM parts p LEFT JOIN stock_movements m ON m.part_id = p.id
     GROUP BY p.id
    ON CONFLICT (part_id) DO UPDATE SET on_hand = excluded.on_hand, reserved = excluded.reserved`);
}

export async function down(knex: Knex): Promise<void> {
  await knex('part_balances').del();
}
