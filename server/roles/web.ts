// The web role: answers HTTP and runs no jobs (it may send them: startJobSender). Kept apart from
// the worker role so each process loads only what its role needs.
import type { Server } from 'node:http';
import type { Knex } from 'knex';
import { createApp } from '../app';
import type { Config } from '../config';

export interface Running {
  stop: () => Promise<void>;
}

/** How long in-flight requests get to finish once a web process is told to stop. */
const DRAIN_MS = 10_000;

export interface Running {
  stop: () => Promise<void>;
}

/** Listens on config.PORT; resolves once listening (rejects if the port is taken). */
export async function startWeb(config: Config, knex: Knex, onListening?: () => void): Promise<Running & { server: Server }> {
  const { app, close } = createApp({ knex, config });
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(config.PORT, config.HOST, () => resolve(s));
    s.once('error', reject);
  });
  onListening?.();
  let stopped: Promise<void> | null = null;
  return {
    server,
    // Stop accepting, let in-flight requests finish (idle keep-alive connections close at once),
    // cut what is still open after DRAIN_MS, then release the session pool.
    stop: () => (stopped ??= (async () => {
      const drained = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeIdleConnections();
      const cut = setTimeout(() => server.closeAllConnections(), DRAIN_MS);
      await drained;
      clearTimeout(cut);
      await close();
    })()),
  };
}
