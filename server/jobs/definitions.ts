import type { Knex } from 'knex';
import type { Config } from '../config';
import type { JobDefinition } from './boss';
import { housekeepingJob } from './housekeeping';
import { outboxJob } from './outbox-worker';
import { releaseJob } from './releases';
import { specSheetJob } from './spec-sheets';
import { stockCheckJob } from './stock-check';

/** Every background job a worker process runs; web processes run none of them. */
export function jobDefinitions(knex: Knex, config: Config): JobDefinition[] {
  return [outboxJob(knex, config), specSheetJob(knex, config), housekeepingJob(knex), stockCheckJob(knex), releaseJob(knex, config)];
}
