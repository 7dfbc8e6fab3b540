import type { Knex } from 'knex';
import type { Config } from '../config';
import { runQueuedSheetJobs } from '../services/spec-sheets/batch-jobs';
import type { JobDefinition } from './boss';

export const SPEC_SHEET_QUEUE = 'spec-sheet-jobs';

/**
 * Batch spec sheets as a pg-boss job. A request is a `sheet_jobs` row written by the API in its own
 * transaction; each run of this job claims waiting rows (row lock, SKIP LOCKED, so several servers
 * share the work) and works them, then queues its next run a moment later. The queue is 'stately'
 * (one run waiting, one running) and a cron line each minute restarts the chain should it stop.
 */
export function specSheetJob(knex: Knex, config: Config, pollSeconds = 1): JobDefinition {
  return {
    name: SPEC_SHEET_QUEUE,
    policy: 'stately',
    cron: '* * * * *',
    pollingIntervalSeconds: Math.max(0.5, pollSeconds),
    retryLimit: 1,
    handler: async (boss) => {
      try {
        await runQueuedSheetJobs(knex, config.publicUrl);
      } finally {
        await boss.sendAfter(SPEC_SHEET_QUEUE, {}, {}, pollSeconds);
      }
    },
  };
}

/** Starts the chain right away instead of waiting for the first cron tick. */
export async function kickSpecSheets(boss: { send: (name: string, data: object) => Promise<string | null> }) {
  await boss.send(SPEC_SHEET_QUEUE, {});
}
