import type { Knex } from 'knex';
import type { Config } from '../config';
import { RELEASE_LOOP } from '../services/production/release';
import { runPendingReleases } from '../services/production/release-job';
import type { JobDefinition } from './boss';

/**
 * Big releases as a job loop. The request marks the batch 'releasing' (the row is the work item)
 * and wakes this loop on commit; each run finishes every such batch chunk by chunk. Chunks are
 * counted under the batch's row lock, so several workers never make a unit twice and a worker
 * that dies leaves the rest to the next run (every few seconds in every worker).
 */
export function releaseJob(knex: Knex, config: Pick<Config, 'RELEASE_CHUNK_UNITS'>, everySeconds = 5): JobDefinition {
  return {
    name: RELEASE_LOOP,
    loop: { everySeconds },
    handler: async () => {
      await runPendingReleases(knex, config.RELEASE_CHUNK_UNITS);
    },
  };
}
