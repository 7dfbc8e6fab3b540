import type { Knex } from 'knex';

// Sheet jobs that survive their worker: a lease (the claiming worker's token, renewed by its
// heartbeat) so a job is worked by one worker at a time, and one row per unit done, so a job taken
// over after a crash resumes at the next unit instead of starting again.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sheet_jobs', (t) => {
    t.string('lease_token', 36); // null unless a worker holds the job
  });
  await knex.schema.createTable('sheet_job_units', (t) => {
    t.integer('job_id').notNullable().references('sheet_jobs.id').onDelete('CASCADE');
    t.integer('unit_id').notNullable().references('units.id').onDelete('CASCADE');
    t.integer('file_id').references('files.id'); // the unit's stored sheet (passed units)
    t.binary('pdf'); // a sheet made on demand for the archive; cleared once the archive is stored
    t.text('failure');
    t.string('lease_token', 36).notNullable(); // the worker that did this unit
    t.timestamp('made_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['job_id', 'unit_id']);
    t.index(['unit_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sheet_job_units');
  await knex.schema.alterTable('sheet_jobs', (t) => {
    t.dropColumn('lease_token');
  });
}
