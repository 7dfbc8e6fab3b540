import PgBoss from 'pg-boss';
import pg from 'pg';
import type { Config } from '../config';
import { listenForWakes } from './wake';

/** What a handler gets: the queue (to send follow-up jobs), the job's data, and a signal that fires when the worker stops. */
export interface JobContext {
  data: unknown;
  /** Aborted when the worker process stops: finish the current unit, leave the rest for the next worker. */
  signal: AbortSignal;
}

/**
 * A background job run only by worker processes (KP_ROLE=worker or all). Two kinds:
 * - a pg-boss queue (the default): one run per job sent to the queue or per `cron` tick. A run must
 *   end within `expireInSeconds`; a worker that dies mid-run leaves its job to be retried by
 *   another worker once that time has passed (checked every few seconds).
 * - a `loop`: the handler runs every `everySeconds` in every worker and at once when woken with
 *   wakeJob(db, name). Right for work claimed row by row with SKIP LOCKED or a lease (the mail
 *   outbox, spec sheet archives): a dead worker's rows are free again as soon as its connection
 *   drops or its lease goes quiet, without waiting for a queue's expiry.
 * Areas add their own by adding a definition to jobDefinitions (server/jobs/definitions.ts).
 */
export interface JobDefinition {
  name: string;
  handler: (boss: PgBoss, context: JobContext) => Promise<void>;
  loop?: { everySeconds: number };
  /** 'stately' keeps at most one job queued and one running. */
  policy?: PgBoss.QueuePolicy;
  /** A cron line (UTC); pg-boss runs one instance per tick across every server. */
  cron?: string;
  pollingIntervalSeconds?: number;
  retryLimit?: number;
  /** How long one run may take before it counts as dead and is retried (default 30 s). */
  expireInSeconds?: number;
}

/** A queue run that takes longer than this is failed and retried, so a killed worker's job waits at most this plus one maintenance pass. */
export const DEFAULT_EXPIRE_SECONDS = 30;
/** How often pg-boss looks for expired runs (its default is 2 minutes). */
const MAINTENANCE_SECONDS = 10;

function newBoss(config: Config, options: Partial<PgBoss.ConstructorOptions> = {}) {
  const boss = new PgBoss({
    connectionString: config.DATABASE_URL, schema: 'pgboss', max: 4,
    // Finished jobs are history nobody reads: archive them after an hour and drop them after a day.
    archiveCompletedAfterSeconds: 3600, deleteAfterDays: 1,
    maintenanceIntervalSeconds: MAINTENANCE_SECONDS,
    ...options,
  });
  boss.on('error', (error) => console.error('[jobs]', error));
  return boss;
}

/** Runs a loop's handler on its timer and on wake-ups, never twice at once in this process. */
function startLoop(def: JobDefinition, boss: PgBoss, signal: AbortSignal) {
  let running: Promise<void> | null = null;
  let again = false;
  const runOnce = async () => {
    do {
      again = false;
      try {
        await def.handler(boss, { data: null, signal });
      } catch (error) {
        if (!signal.aborted) console.error(`[jobs] ${def.name}:`, error);
      }
    } while (again && !signal.aborted);
  };
  const wake = () => {
    if (signal.aborted) return;
    if (running) {
      again = true;
      return;
    }
    running = runOnce().finally(() => {
      running = null;
    });
  };
  const timer = setInterval(wake, def.loop!.everySeconds * 1000);
  wake();
  return {
    wake,
    stop: async () => {
      clearInterval(timer);
      await running;
    },
  };
}

/** The advisory lock key that queue setup holds (any constant unique to this use). */
const QUEUE_SETUP_LOCK = 7_402_001;

/** Runs `fn` while holding a PostgreSQL advisory lock on a connection of its own: one process at a time. */
async function oneAtATime(databaseUrl: string, fn: () => Promise<void>) {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    await client.query('SELECT pg_advisory_lock($1)', [QUEUE_SETUP_LOCK]);
    await fn();
  } finally {
    await client.end().catch(() => {});
  }
}

/**
 * Starts pg-boss on the product's PostgreSQL (schema `pgboss`), creates each queue, registers its
 * worker and schedule, and starts each loop with a listener that wakes it. Jobs live in the
 * database, so any worker process may run them and none is lost when one stops.
 */
export async function startJobs(config: Config, definitions: JobDefinition[]) {
  const boss = newBoss(config);
  const controller = new AbortController();
  await boss.start();
  const loops = new Map<string, ReturnType<typeof startLoop>>();
  // Creating queues attaches partitions and foreign keys in pg-boss's schema: two workers starting at
  // once deadlock there, so each process sets its queues up alone.
  await oneAtATime(config.DATABASE_URL, async () => {
    for (const def of definitions) {
      if (def.loop) {
        // An older version ran this as a queue: drop its schedule so its cron ticks stop piling up.
        if (await boss.getQueue(def.name)) {
          await boss.unschedule(def.name);
          await boss.deleteQueue(def.name);
        }
        continue;
      }
      const queue = {
        name: def.name, policy: def.policy ?? 'standard', retryLimit: def.retryLimit ?? 3, retryBackoff: true,
        expireInSeconds: def.expireInSeconds ?? DEFAULT_EXPIRE_SECONDS,
      };
      // createQueue leaves an existing queue as it was: update it so a changed expiry applies.
      if (await boss.getQueue(def.name)) await boss.updateQueue(def.name, queue);
      else await boss.createQueue(def.name, queue);
      if (def.cron) await boss.schedule(def.name, def.cron);
    }
  });
  for (const def of definitions) {
    if (def.loop) {
      loops.set(def.name, startLoop(def, boss, controller.signal));
      continue;
    }
    await boss.work(def.name, { pollingIntervalSeconds: def.pollingIntervalSeconds ?? 2, batchSize: 1 }, async ([job]) =>
      def.handler(boss, { data: job?.data ?? null, signal: controller.signal }));
  }
  const listener = loops.size > 0 ? await listenForWakes(config.DATABASE_URL, (name) => loops.get(name)?.wake()) : null;
  let stopped: Promise<void> | null = null;
  return {
    boss,
    /** Runs a loop now (as a wake-up from another process would). */
    wake: (name: string) => loops.get(name)?.wake(),
    /** Lets each loop finish its current unit, stops the queue (waiting for running jobs), then closes its connections. Safe to call twice. */
    stop: () => {
      stopped ??= (async () => {
        controller.abort();
        await listener?.close();
        await Promise.all([...loops.values()].map((loop) => loop.stop()));
        await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      })();
      return stopped;
    },
  };
}

/**
 * A pg-boss client that only sends jobs (no workers, no maintenance, no cron): for web processes
 * that hand work to the workers.
 */
export async function startJobSender(config: Config) {
  const boss = newBoss(config, { max: 2, supervise: false, schedule: false });
  await boss.start();
  let stopped: Promise<void> | null = null;
  return {
    boss,
    stop: () => (stopped ??= boss.stop({ graceful: true, wait: true, timeout: 5_000 })),
  };
}
