import type { Knex } from 'knex';

// A shipment names its carrier from the settings' list: the carrier's id (null for shipments made
// before the list existed, or a carrier removed since), and the tracking link as it was made when
// the parcel shipped, so a later change of the carrier's template does not rewrite sent links.
// `carrier` keeps the carrier's name as shipped.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('shipments', (t) => {
    t.integer('carrier_id').references('carriers.id').onDelete('SET NULL').index();
    t.string('tracking_url', 400).notNullable().defaultTo('');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('shipments', (t) => {
    t.dropColumn('tracking_url');
    t.dropColumn('carrier_id');
  });
}
