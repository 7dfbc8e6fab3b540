import type { Knex } from 'knex';
import type { Config } from '../config';
import { runQueuedSheetJobs, SHEET_JOBS_LOOP } from '../services/spec-sheets/batch-jobs';
import type { JobDefinition } from './boss';

/**
 * Batch spec sheets as a loop in every worker. A request is a `sheet_jobs` row written by the API
 * in its own transaction, which also wakes this loop (so work starts as soon as it commits). Each
 * run claims waiting jobs, or jobs whose worker went quiet, under a lease and works them unit by
 * unit; the timer (every `pollSeconds`) catches takeovers and any missed wake-up.
 */
export function specSheetJob(knex: Knex, config: Config, pollSeconds = 2): JobDefinition {
  return {
    name: SHEET_JOBS_LOOP,
    loop: { everySeconds: pollSeconds },
    handler: async (_boss, { signal }) => {
      await runQueuedSheetJobs(knex, config.publicUrl, signal);
    },
  };
}
