import type { Knex } from 'knex';

// Parts and their stock ledger, clipping devices, pedal models with revisions (BOM, drive
// stage, build steps) and clipping options built from device strings.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('files', (t) => {
    // Uploads and generated documents live in PostgreSQL so every server instance sees them.
    t.increments('id').primary();
    t.string('purpose', 40).notNullable(); // model-photo, unit-photo, wav-capture, spec-sheet, packing-slip, archive
    t.string('filename', 200).notNullable();
    t.string('content_type', 100).notNullable();
    t.integer('size_bytes').notNullable();
    t.binary('data').notNullable();
    t.integer('uploaded_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('suppliers', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable().unique();
    t.string('email', 200);
    t.string('website', 200);
    t.integer('default_lead_time_days').notNullable().defaultTo(7);
  });

  await knex.schema.createTable('parts', (t) => {
    t.increments('id').primary();
    t.string('part_number', 40).notNullable().unique();
    t.string('category', 30).notNullable();
    t.string('value', 80).notNullable().defaultTo('');
    t.string('package', 60).notNullable().defaultTo('');
    t.string('manufacturer_part_number', 80).notNullable().defaultTo('');
    t.integer('supplier_id').references('suppliers.id');
    t.integer('unit_cost_cents').notNullable().defaultTo(0);
    t.integer('lead_time_days').notNullable().defaultTo(7);
    t.integer('reorder_point').notNullable().defaultTo(0);
    t.string('bin_location', 40).notNullable().defaultTo('');
    t.text('notes').notNullable().defaultTo('');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE parts ADD CONSTRAINT parts_category_check CHECK (category IN
    ('resistor','capacitor','ic','transistor','diode','led','pot','jack','switch','enclosure','pcb','hardware','wire','knob','packaging','other'))`);
  await knex.raw('ALTER TABLE parts ADD CONSTRAINT parts_numbers_check CHECK (unit_cost_cents >= 0 AND lead_time_days >= 0 AND reorder_point >= 0)');

  // The stock ledger: on-hand and reserved are sums over it, never stored numbers.
  // Each movement states its effect on on-hand and on reserved (see the part_stock view).
  await knex.schema.createTable('stock_movements', (t) => {
    t.bigIncrements('id').primary();
    t.integer('part_id').notNullable().references('parts.id');
    t.string('kind', 12).notNullable();
    t.integer('quantity').notNullable();
    t.integer('on_hand_delta').notNullable();
    t.integer('reserved_delta').notNullable();
    t.integer('user_id').references('users.id');
    t.text('reason').notNullable().defaultTo('');
    t.string('reference', 80).notNullable().defaultTo(''); // e.g. a supplier delivery note
    t.integer('batch_id'); // foreign keys added when batches and units exist
    t.integer('unit_id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['part_id', 'created_at']);
  });
  await knex.raw(`ALTER TABLE stock_movements ADD CONSTRAINT stock_movements_kind_check
    CHECK (kind IN ('receive','adjust','reserve','release','consume','return'))`);
  await knex.raw(`CREATE VIEW part_stock AS
    SELECT p.id AS part_id,
           COALESCE(SUM(m.on_hand_delta), 0)::int AS on_hand,
           COALESCE(SUM(m.reserved_delta), 0)::int AS reserved,
           (COALESCE(SUM(m.on_hand_delta), 0) - COALESCE(SUM(m.reserved_delta), 0))::int AS available
    FROM parts p LEFT JOIN stock_movements m ON m.part_id = p.id
    GROUP BY p.id`);

  // Clipping devices: engine parameters (SPICE names) with where they came from.
  await knex.schema.createTable('devices', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable().unique();
    t.string('kind', 20).notNullable(); // silicon, schottky, germanium, led, other
    t.string('preset_key', 60).unique(); // set for engine presets
    t.double('is_amps').notNullable();
    t.double('n').notNullable();
    t.double('rs_ohms').notNullable().defaultTo(0);
    t.double('eg_ev').notNullable().defaultTo(1.11);
    t.double('xti').notNullable().defaultTo(3);
    t.text('provenance').notNullable();
    t.jsonb('fit_points'); // the datasheet points a custom device was fitted from
    t.integer('part_id').references('parts.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('models', (t) => {
    t.increments('id').primary();
    t.string('name', 80).notNullable().unique();
    t.string('sku', 40).notNullable().unique();
    t.text('description').notNullable().defaultTo('');
    t.integer('base_price_cents').notNullable();
    t.boolean('published').notNullable().defaultTo(false);
    t.integer('photo_file_id').references('files.id');
    t.integer('active_revision_id'); // FK below, after revisions exist
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('ALTER TABLE models ADD CONSTRAINT models_price_check CHECK (base_price_cents >= 0)');

  await knex.schema.createTable('model_revisions', (t) => {
    t.increments('id').primary();
    t.integer('model_id').notNullable().references('models.id').onDelete('CASCADE');
    t.integer('number').notNullable();
    t.string('label', 80).notNullable().defaultTo('');
    t.text('notes').notNullable().defaultTo('');
    // The drive stage ahead of the clipper, as the engine needs it.
    t.double('drive_min_gain').notNullable();
    t.double('drive_max_gain').notNullable();
    t.string('drive_taper', 10).notNullable().defaultTo('audio'); // linear | audio
    t.double('input_peak_v').notNullable().defaultTo(0.1);
    t.double('supply_v').notNullable().defaultTo(9);
    t.double('reference_drive').notNullable().defaultTo(0.5); // the setting THD is read at (0..1)
    t.timestamp('frozen_at', { useTz: true }); // set when a released batch uses it: then read-only
    t.integer('copied_from_revision_id').references('model_revisions.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['model_id', 'number']);
  });
  await knex.raw(`ALTER TABLE models ADD CONSTRAINT models_active_revision_fk
    FOREIGN KEY (active_revision_id) REFERENCES model_revisions(id) DEFERRABLE INITIALLY DEFERRED`);

  await knex.schema.createTable('bom_lines', (t) => {
    t.increments('id').primary();
    t.integer('revision_id').notNullable().references('model_revisions.id').onDelete('CASCADE');
    t.integer('part_id').notNullable().references('parts.id');
    t.integer('quantity').notNullable();
    t.text('designators').notNullable().defaultTo(''); // "R1 R2 R7", space separated
    t.text('notes').notNullable().defaultTo('');
    t.boolean('needs_lot').notNullable().defaultTo(false); // assembler records the part lot
    t.integer('position').notNullable().defaultTo(0);
  });
  await knex.raw('ALTER TABLE bom_lines ADD CONSTRAINT bom_lines_quantity_check CHECK (quantity > 0)');

  await knex.schema.createTable('build_steps', (t) => {
    t.increments('id').primary();
    t.integer('revision_id').notNullable().references('model_revisions.id').onDelete('CASCADE');
    t.integer('position').notNullable();
    t.string('title', 120).notNullable();
    t.text('instructions').notNullable().defaultTo('');
    t.integer('standard_minutes').notNullable();
    t.string('skill', 40).notNullable(); // through-hole, smd-rework, device-matching, enclosure, final-check
    t.text('safety_note').notNullable().defaultTo('');
    t.boolean('soldering').notNullable().defaultTo(false);
    t.unique(['revision_id', 'position']);
  });

  await knex.schema.createTable('clipping_options', (t) => {
    t.increments('id').primary();
    t.integer('model_id').notNullable().references('models.id').onDelete('CASCADE');
    t.string('code', 20).notNullable(); // short code used in serials and SKUs, e.g. "SI2"
    t.string('name', 80).notNullable();
    t.text('description').notNullable().defaultTo('');
    t.string('topology', 10).notNullable(); // shunt | feedback | none
    // Network values in the engine's contract names: seriesOhms, shuntFarads, feedbackOhms, groundOhms, feedbackFarads.
    t.jsonb('network').notNullable();
    t.integer('price_surcharge_cents').notNullable().defaultTo(0);
    t.boolean('published').notNullable().defaultTo(false);
    t.integer('position').notNullable().defaultTo(0);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['model_id', 'code']);
  });
  await knex.raw(`ALTER TABLE clipping_options ADD CONSTRAINT clipping_options_topology_check CHECK (topology IN ('shunt','feedback','none'))`);

  // The devices in series on each side of an option; their linked parts are the option's BOM delta.
  await knex.schema.createTable('option_devices', (t) => {
    t.increments('id').primary();
    t.integer('option_id').notNullable().references('clipping_options.id').onDelete('CASCADE');
    t.string('side', 10).notNullable(); // positive | negative
    t.integer('position').notNullable();
    t.integer('device_id').notNullable().references('devices.id');
    t.unique(['option_id', 'side', 'position']);
  });
  await knex.raw(`ALTER TABLE option_devices ADD CONSTRAINT option_devices_side_check CHECK (side IN ('positive','negative'))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('option_devices');
  await knex.schema.dropTable('clipping_options');
  await knex.schema.dropTable('build_steps');
  await knex.schema.dropTable('bom_lines');
  await knex.raw('ALTER TABLE models DROP CONSTRAINT models_active_revision_fk');
  await knex.schema.dropTable('model_revisions');
  await knex.schema.dropTable('models');
  await knex.schema.dropTable('devices');
  await knex.raw('DROP VIEW part_stock');
  await knex.schema.dropTable('stock_movements');
  await knex.schema.dropTable('parts');
  await knex.schema.dropTable('suppliers');
  await knex.schema.dropTable('files');
}
