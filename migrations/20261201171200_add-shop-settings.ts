import type { Knex } from 'knex';

// Settings the catalog, ordering, bench and spec sheets read.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => {
    t.integer('shipping_cents').notNullable().defaultTo(900);
    t.integer('tax_rate_basis_points').notNullable().defaultTo(1900); // 19.00 %
    t.boolean('prices_include_tax').notNullable().defaultTo(true);
    t.double('vf_test_current_ma').notNullable().defaultTo(1); // bench current for matching clipping devices
    t.double('thd_tolerance_percent').notNullable().defaultTo(15); // measured vs predicted THD, relative
    t.string('paper_size', 10).notNullable().defaultTo('A4'); // A4 | Letter
    t.string('sheet_staff_names', 10).notNullable().defaultTo('initials'); // names | initials
    t.string('shop_address', 300).notNullable().defaultTo('');
    t.string('serial_prefix', 6).notNullable().defaultTo('HM');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => {
    for (const c of ['shipping_cents', 'tax_rate_basis_points', 'prices_include_tax', 'vf_test_current_ma', 'thd_tolerance_percent', 'paper_size', 'sheet_staff_names', 'shop_address', 'serial_prefix']) t.dropColumn(c);
  });
}
