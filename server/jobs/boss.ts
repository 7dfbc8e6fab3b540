import PgBoss from 'pg-boss';
import type { Config } from '../config';

/**
 * A background job: its queue, its worker and, optionally, a cron schedule. Areas add their own
 * (spec sheet archives, reminders, …) by passing more definitions to startJobs.
 */
export interface JobDefinition {
  name: string;
  handler: (boss: PgBoss) => Promise<void>;
  /** 'stately' keeps at most one job queued and one running: right for sweeps. */
  policy?: PgBoss.QueuePolicy;
  /** A cron line (UTC); pg-boss runs one instance per tick across every server. */
  cron?: string;
  pollingIntervalSeconds?: number;
  retryLimit?: number;
}

/**
 * Starts pg-boss on the product's PostgreSQL (schema `pgboss`), creates each queue, registers its
 * worker and schedule. Jobs live in the database, so any server instance may run them and none
 * is lost when one stops.
 */
export async function startJobs(config: Config, definitions: JobDefinition[]) {
  const boss = new PgBoss({
    connectionString: config.DATABASE_URL, schema: 'pgboss', max: 4,
    // Sweeps re-queue themselves every few seconds; finished jobs are history nobody reads, so
    // archive them after an hour and drop them after a day instead of keeping a week of them.
    archiveCompletedAfterSeconds: 3600, deleteAfterDays: 1,
  });
  boss.on('error', (error) => console.error('[jobs]', error));
  await boss.start();
  for (const def of definitions) {
    await boss.createQueue(def.name, { name: def.name, policy: def.policy ?? 'standard', retryLimit: def.retryLimit ?? 3, retryBackoff: true });
    await boss.work(def.name, { pollingIntervalSeconds: def.pollingIntervalSeconds ?? 2, batchSize: 1 }, async () => def.handler(boss));
    if (def.cron) await boss.schedule(def.name, def.cron);
  }
  return { boss, stop: () => boss.stop({ graceful: true, wait: true, timeout: 10_000 }) };
}
