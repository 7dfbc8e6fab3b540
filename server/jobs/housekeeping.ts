import type { Knex } from 'knex';
import { deleteOldResets } from '../services/password-resets';
import type { JobDefinition } from './boss';

export const HOUSEKEEPING_QUEUE = 'housekeeping';

/** Deletes expired sessions, finished rate-limit windows and old reset links; returns how many rows of each went. */
export async function sweepExpired(knex: Knex) {
  const sessions = await knex('session').where('expire', '<', knex.fn.now()).delete();
  const rateLimits = await knex('rate_limits').where('reset_at', '<', knex.fn.now()).delete();
  const passwordResets = await deleteOldResets(knex);
  return { sessions, rateLimits, passwordResets };
}

/**
 * Housekeeping every ten minutes, once across all workers (a pg-boss cron). Web processes do not
 * prune sessions themselves (connect-pg-simple's timer is off), so this is the only place it happens.
 */
export function housekeepingJob(knex: Knex): JobDefinition {
  return {
    name: HOUSEKEEPING_QUEUE,
    policy: 'stately',
    cron: '*/10 * * * *',
    retryLimit: 1,
    handler: async () => {
      await sweepExpired(knex);
    },
  };
}
