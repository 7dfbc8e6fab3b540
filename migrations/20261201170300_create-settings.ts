import type { Knex } from 'knex';

// One row of shop-wide settings (name, currency, time zone, rates). Values are set by seeds.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('settings', (t) => {
    t.integer('id').primary().defaultTo(1);
    t.string('shop_name', 120).notNullable();
    t.string('shop_email', 200).notNullable();
    t.string('currency', 3).notNullable().defaultTo('EUR');
    t.string('time_zone', 60).notNullable().defaultTo('Europe/Berlin');
    t.integer('labour_cents_per_hour').notNullable().defaultTo(3000);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('ALTER TABLE settings ADD CONSTRAINT settings_single_row CHECK (id = 1)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('settings');
}
