import type { Knex } from 'knex';

// The owner's settings screen (issue 14): the shop's identity, order-number prefix, tax rules,
// bench figures and the shop's formatting locale on the one settings row; shipping zones and
// carriers as their own tables; and an audit row for every change made through the settings API.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('settings', (t) => {
    t.string('vat_id', 20).notNullable().defaultTo(''); // the shop's VAT identification number, printed on invoices
    t.integer('logo_file_id').references('files.id').onDelete('SET NULL');
    t.string('public_url', 200).notNullable().defaultTo(''); // where customers find the shop (links in mails and on sheets)
    t.string('order_number_prefix', 6).notNullable().defaultTo('HM');
    t.string('home_country', 2).notNullable().defaultTo('DE'); // ISO 3166-1 alpha-2: where the shop is established for VAT
    t.boolean('oss_over_threshold').notNullable().defaultTo(true); // EU distance sales over the threshold: destination rates
    t.double('max_current_draw_ma').notNullable().defaultTo(100); // a unit drawing more fails the bench test unless a reason is given
    t.string('locale', 35).notNullable().defaultTo('en-GB'); // BCP 47: how the shop formats numbers, money and dates
    t.integer('fast_step_percent').notNullable().defaultTo(25); // a step finished under this share of its standard time asks for confirmation
  });
  await knex.raw(`ALTER TABLE settings
    ADD CONSTRAINT settings_fast_step_percent_range CHECK (fast_step_percent BETWEEN 0 AND 100),
    ADD CONSTRAINT settings_home_country_format CHECK (home_country ~ '^[A-Z]{2}$'),
    ADD CONSTRAINT settings_max_current_positive CHECK (max_current_draw_ma > 0)`);

  await knex.schema.createTable('shipping_zones', (t) => {
    t.increments('id').primary();
    t.string('name', 60).notNullable();
    t.specificType('countries', 'text[]').notNullable(); // ISO 3166-1 alpha-2 codes; a country is in at most one zone
    t.integer('rate_cents').notNullable();
    t.integer('position').notNullable().defaultTo(0);
  });
  await knex.raw('ALTER TABLE shipping_zones ADD CONSTRAINT shipping_zones_rate_nonnegative CHECK (rate_cents >= 0)');

  await knex.schema.createTable('carriers', (t) => {
    t.increments('id').primary();
    t.string('name', 60).notNullable().unique();
    t.string('tracking_url_template', 300).notNullable(); // https URL with a {tracking} placeholder
    t.boolean('active').notNullable().defaultTo(true);
    t.integer('position').notNullable().defaultTo(0);
  });

  await knex.schema.createTable('settings_audit', (t) => {
    t.bigIncrements('id').primary();
    t.integer('user_id').notNullable().references('users.id');
    t.timestamp('changed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.string('field', 60).notNullable(); // the API's field name, e.g. shopName, carriers
    t.jsonb('old_value');
    t.jsonb('new_value');
    t.index(['changed_at']);
    t.index(['user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('settings_audit');
  await knex.schema.dropTable('carriers');
  await knex.schema.dropTable('shipping_zones');
  await knex.raw(`ALTER TABLE settings DROP CONSTRAINT settings_fast_step_percent_range,
    DROP CONSTRAINT settings_home_country_format, DROP CONSTRAINT settings_max_current_positive`);
  await knex.schema.alterTable('settings', (t) => {
    for (const c of ['vat_id', 'logo_file_id', 'public_url', 'order_number_prefix', 'home_country', 'oss_over_threshold', 'max_current_draw_ma', 'locale', 'fast_step_percent']) t.dropColumn(c);
  });
}
