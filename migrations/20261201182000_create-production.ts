import type { Knex } from 'knex';

// Production: assembler profiles, batches and their lines, serial-numbered units with their
// history, step progress, fitted devices, part lots, photos, bench tests and shipments.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('assembler_profiles', (t) => {
    t.integer('user_id').primary().references('users.id').onDelete('CASCADE');
    t.specificType('skills', 'text[]').notNullable().defaultTo('{}');
    t.integer('daily_capacity_minutes').notNullable().defaultTo(360);
  });
  await knex.raw('ALTER TABLE assembler_profiles ADD CONSTRAINT assembler_capacity_check CHECK (daily_capacity_minutes BETWEEN 0 AND 1440)');

  // Batch numbers come from a sequence, so a number (and every serial built on it) is never reused.
  await knex.raw('CREATE SEQUENCE batch_number_seq START 1');
  await knex.schema.createTable('batches', (t) => {
    t.increments('id').primary();
    t.integer('number').notNullable().unique();
    t.integer('revision_id').notNullable().references('model_revisions.id');
    t.string('state', 12).notNullable().defaultTo('draft');
    t.text('notes').notNullable().defaultTo('');
    t.text('shortage_override_reason');
    t.jsonb('shortages_at_release');
    t.date('planned_start');
    t.integer('created_by').references('users.id');
    t.integer('released_by').references('users.id');
    t.timestamp('released_at', { useTz: true });
    t.timestamp('closed_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE batches ADD CONSTRAINT batches_state_check CHECK (state IN ('draft','released','on_bench','closed','cancelled'))`);

  // A line is either a pulled order line (its quantity) or a stock build for an option.
  await knex.schema.createTable('batch_lines', (t) => {
    t.increments('id').primary();
    t.integer('batch_id').notNullable().references('batches.id').onDelete('CASCADE');
    t.integer('option_id').notNullable().references('clipping_options.id');
    t.integer('order_line_id').references('order_lines.id');
    t.integer('quantity').notNullable();
    t.index(['order_line_id']); // one live batch per order line: checked under a row lock in the service
  });
  await knex.raw('ALTER TABLE batch_lines ADD CONSTRAINT batch_lines_quantity_check CHECK (quantity > 0 AND quantity <= 500)');

  await knex.schema.createTable('units', (t) => {
    t.increments('id').primary();
    t.string('serial', 40).notNullable().unique();
    t.integer('batch_id').notNullable().references('batches.id');
    t.integer('sequence').notNullable(); // 1..N inside the batch, no gaps
    t.integer('batch_line_id').notNullable().references('batch_lines.id');
    t.integer('option_id').notNullable().references('clipping_options.id');
    t.integer('order_id').references('orders.id');
    t.string('state', 12).notNullable().defaultTo('waiting');
    t.integer('assembler_id').references('users.id');
    t.date('planned_date');
    t.integer('queue_position').notNullable().defaultTo(0);
    t.timestamp('kitted_at', { useTz: true });
    t.jsonb('predicted'); // {thdPercent, harmonicsDbc, sweep, measuredAt}: this unit's own profile
    t.integer('shipment_id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['batch_id', 'sequence']);
    t.index(['assembler_id', 'state']);
    t.index(['order_id']);
  });
  await knex.raw(`ALTER TABLE units ADD CONSTRAINT units_state_check CHECK (state IN
    ('waiting','building','built','rework','passed','in_stock','shipped','cancelled'))`);

  await knex.schema.createTable('unit_events', (t) => {
    t.bigIncrements('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.string('kind', 30).notNullable(); // state-change, assigned, kitted, step, devices, test, note
    t.string('from_state', 12);
    t.string('to_state', 12);
    t.text('message').notNullable().defaultTo('');
    t.integer('user_id').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['unit_id', 'created_at']);
  });

  await knex.schema.createTable('unit_steps', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('step_id').notNullable().references('build_steps.id');
    t.integer('user_id').references('users.id');
    t.timestamp('started_at', { useTz: true }).notNullable();
    t.timestamp('finished_at', { useTz: true });
    t.double('actual_minutes');
    t.unique(['unit_id', 'step_id']);
  });

  await knex.schema.createTable('unit_devices', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('option_device_id').notNullable().references('option_devices.id');
    t.double('measured_vf').notNullable();
    t.double('test_current_ma').notNullable();
    t.boolean('out_of_range').notNullable().defaultTo(false);
    t.integer('user_id').references('users.id');
    t.timestamp('measured_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['unit_id', 'option_device_id']);
  });

  await knex.schema.createTable('unit_part_lots', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('bom_line_id').notNullable().references('bom_lines.id');
    t.string('lot', 80).notNullable();
    t.unique(['unit_id', 'bom_line_id']);
  });

  await knex.schema.createTable('unit_photos', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('file_id').notNullable().references('files.id');
    t.string('caption', 200).notNullable().defaultTo('');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('test_records', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('tester_id').references('users.id');
    t.double('current_draw_ma').notNullable();
    t.double('measured_thd_percent').notNullable();
    t.double('predicted_thd_percent');
    t.double('tolerance_percent').notNullable();
    t.boolean('within_tolerance');
    t.integer('wav_file_id').references('files.id');
    t.jsonb('wav_analysis'); // {sampleRate, channels, durationS, fundamentalHz, harmonics, thdPercent}
    t.string('outcome', 6).notNullable(); // pass | fail
    t.text('reason').notNullable().defaultTo('');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE test_records ADD CONSTRAINT test_records_outcome_check CHECK (outcome IN ('pass','fail'))`);

  await knex.schema.createTable('shipments', (t) => {
    t.increments('id').primary();
    t.integer('order_id').notNullable().references('orders.id');
    t.string('carrier', 60).notNullable();
    t.string('tracking_number', 80).notNullable();
    t.integer('packing_slip_file_id').references('files.id');
    t.integer('shipped_by').references('users.id');
    t.timestamp('shipped_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('delivered_at', { useTz: true });
    t.unique(['order_id']);
  });
  await knex.raw('ALTER TABLE units ADD CONSTRAINT units_shipment_fk FOREIGN KEY (shipment_id) REFERENCES shipments(id)');

  await knex.raw('ALTER TABLE stock_movements ADD CONSTRAINT stock_movements_batch_fk FOREIGN KEY (batch_id) REFERENCES batches(id)');
  await knex.raw('ALTER TABLE stock_movements ADD CONSTRAINT stock_movements_unit_fk FOREIGN KEY (unit_id) REFERENCES units(id)');
  await knex.raw('ALTER TABLE order_lines ADD CONSTRAINT order_lines_batch_fk FOREIGN KEY (batch_id) REFERENCES batches(id)');
  await knex.raw('CREATE INDEX stock_movements_batch_idx ON stock_movements (batch_id, part_id)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS stock_movements_batch_idx');
  await knex.raw('ALTER TABLE order_lines DROP CONSTRAINT order_lines_batch_fk');
  await knex.raw('ALTER TABLE stock_movements DROP CONSTRAINT stock_movements_unit_fk');
  await knex.raw('ALTER TABLE stock_movements DROP CONSTRAINT stock_movements_batch_fk');
  await knex.raw('ALTER TABLE units DROP CONSTRAINT units_shipment_fk');
  for (const table of ['shipments', 'test_records', 'unit_photos', 'unit_part_lots', 'unit_devices', 'unit_steps', 'unit_events', 'units', 'batch_lines', 'batches', 'assembler_profiles']) {
    await knex.schema.dropTable(table);
  }
  await knex.raw('DROP SEQUENCE batch_number_seq');
}
