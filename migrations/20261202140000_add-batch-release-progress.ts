import type { Knex } from 'knex';

// A big release runs as a background job (server/services/production/release-job.ts): the batch is
// 'releasing' while its units are created chunk by chunk, and its progress lives on the batch row so
// any server instance can report it and a job that dies resumes from the units already made.
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE batches DROP CONSTRAINT batches_state_check');
  await knex.raw(`ALTER TABLE batches ADD CONSTRAINT batches_state_check CHECK (state IN ('draft','releasing','released','on_bench','closed','cancelled'))`);
  await knex.schema.alterTable('batches', (t) => {
    t.integer('release_total'); // units the release creates; null until a release starts
    t.integer('release_done').notNullable().defaultTo(0);
    t.jsonb('release_input'); // {startDate, userId, publicUrl} kept for the job
    t.text('release_error');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('batches', (t) => {
    t.dropColumn('release_total');
    t.dropColumn('release_done');
    t.dropColumn('release_input');
    t.dropColumn('release_error');
  });
  await knex.raw('ALTER TABLE batches DROP CONSTRAINT batches_state_check');
  await knex.raw(`ALTER TABLE batches ADD CONSTRAINT batches_state_check CHECK (state IN ('draft','released','on_bench','closed','cancelled'))`);
}
