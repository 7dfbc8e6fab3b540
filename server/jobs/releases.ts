import type { Knex } from 'knex';
import type { Config } from '../config';
import { runPendingReleases } from '../services/production/release-job';
import type { JobDefinition } from './boss';

export const RELEASE_QUEUE = 'batch-releases';

/**
 * Big releases as a pg-boss job. The request marks the batch 'releasing' (the row is the work
 * item); each run finishes every such batch chunk by chunk, then queues its next run a moment
 * later. 'stately' (one waiting, one running) plus a cron line each minute, as the sheet jobs.
 */
export function releaseJob(knex: Knex, config: Pick<Config, 'RELEASE_CHUNK_UNITS'>, pollSeconds = 1): JobDefinition {
  return {
    name: RELEASE_QUEUE,
    policy: 'stately',
    cron: '* * * * *',
    pollingIntervalSeconds: Math.max(0.5, pollSeconds),
    retryLimit: 1,
    handler: async (boss) => {
      try {
        await runPendingReleases(knex, config.RELEASE_CHUNK_UNITS);
      } finally {
        await boss.sendAfter(RELEASE_QUEUE, {}, {}, pollSeconds);
      }
    },
  };
}

/** Starts the chain right away instead of waiting for the first cron tick. */
export async function kickReleases(boss: { send: (name: string, data: object) => Promise<string | null> }) {
  await boss.send(RELEASE_QUEUE, {});
}
