// The worker role: runs every background job (server/jobs/definitions.ts) and serves nothing.
// `npm start` runs one web and one worker process; KP_ROLE=all runs both roles in one process.
import type { Knex } from 'knex';
import type { Config } from '../config';
import { startJobs } from '../jobs/boss';
import { jobDefinitions } from '../jobs/definitions';
import type { Running } from './web';

/** Starts every background job; stop() lets running work reach a safe point first. */
export async function startWorker(config: Config, knex: Knex): Promise<Running> {
  const jobs = await startJobs(config, jobDefinitions(knex, config));
  return { stop: jobs.stop };
}
