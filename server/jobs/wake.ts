// Waking a job loop in whichever worker process listens: PostgreSQL's NOTIFY on one channel, with the
// loop's name as payload. Sent inside the transaction that creates the work, the notice is delivered
// only when that transaction commits, so a worker never wakes before the row it looks for exists.
import type { Knex } from 'knex';
import pg from 'pg';

const CHANNEL = 'kneepoint_jobs';
const RECONNECT_MS = 1_000;

/** Wakes the loop `name` in the worker processes (on commit, when `db` is a transaction). */
export async function wakeJob(db: Knex | Knex.Transaction, name: string) {
  await db.raw('SELECT pg_notify(?, ?)', [CHANNEL, name]);
}

/**
 * Listens for wake-ups on a connection of its own, reconnecting if it drops (loops also run on
 * their timer, so a wake-up missed while reconnecting costs one timer period, not the job).
 */
export async function listenForWakes(databaseUrl: string, onWake: (name: string) => void) {
  let client: pg.Client | null = null;
  let closed = false;
  let retry: NodeJS.Timeout | null = null;

  const connect = async () => {
    retry = null;
    const next = new pg.Client({ connectionString: databaseUrl });
    next.on('notification', (message) => {
      if (message.channel === CHANNEL && message.payload) onWake(message.payload);
    });
    const reconnect = () => {
      if (client === next) client = null;
      void next.end().catch(() => {});
      if (!closed && !retry) retry = setTimeout(() => void connect(), RECONNECT_MS);
    };
    next.on('error', reconnect);
    next.on('end', reconnect);
    try {
      await next.connect();
      await next.query(`LISTEN ${CHANNEL}`);
      if (closed) await next.end();
      else client = next;
    } catch {
      reconnect();
    }
  };

  await connect();
  return {
    close: async () => {
      closed = true;
      if (retry) clearTimeout(retry);
      const current = client;
      client = null;
      await current?.end().catch(() => {});
    },
  };
}
