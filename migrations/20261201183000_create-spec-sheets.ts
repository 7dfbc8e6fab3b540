import type { Knex } from 'knex';

// Spec sheets: the stored PDF of each passed unit, the cached nominal band of each option's
// circuit (slow to compute, the same for every unit of it), and batch sheet jobs whose
// progress lives here so any server instance can answer and a page reload keeps it.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('spec_sheets', (t) => {
    t.increments('id').primary();
    t.integer('unit_id').notNullable().unique().references('units.id').onDelete('CASCADE');
    t.integer('file_id').notNullable().references('files.id');
    t.integer('version').notNullable().defaultTo(1); // 1 when first stored, +1 per explicit regeneration
    t.timestamp('generated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer('generated_by').references('users.id');
  });

  await knex.schema.createTable('sheet_band_cache', (t) => {
    t.string('circuit_hash', 64).primary(); // sha256 of the canonical CircuitSpec JSON and the band's settings
    t.jsonb('band').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('sheet_jobs', (t) => {
    t.increments('id').primary();
    t.integer('batch_id').notNullable().references('batches.id').onDelete('CASCADE');
    t.string('state', 10).notNullable().defaultTo('queued');
    t.integer('total').notNullable().defaultTo(0);
    t.integer('done').notNullable().defaultTo(0);
    t.jsonb('failures').notNullable().defaultTo('{}'); // {serial: reason}
    t.integer('archive_file_id').references('files.id');
    t.text('error');
    t.integer('requested_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('started_at', { useTz: true });
    t.timestamp('heartbeat_at', { useTz: true }); // a running job whose heartbeat stops is picked up again
    t.timestamp('finished_at', { useTz: true });
    t.index(['batch_id', 'created_at']);
  });
  await knex.raw(`ALTER TABLE sheet_jobs ADD CONSTRAINT sheet_jobs_state_check CHECK (state IN ('queued','running','finished','failed'))`);
  await knex.raw('ALTER TABLE sheet_jobs ADD CONSTRAINT sheet_jobs_progress_check CHECK (done >= 0 AND done <= total)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sheet_jobs');
  await knex.schema.dropTable('sheet_band_cache');
  await knex.schema.dropTable('spec_sheets');
}
