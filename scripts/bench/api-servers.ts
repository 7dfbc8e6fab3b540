// The two servers `npm run bench -- api` measures, each run as its own process so the load
// generator never shares their event loop: `app` is the product as production runs it (no job
// workers), `baseline` a bare Express 5 + pg server doing one primary-key lookup per request.
// Each listens on 127.0.0.1 on a free port and prints `{"port": N}` on its first line. Over an IPC
// channel, `app` answers 'loop:start' / 'loop:stop' with its own event loop's delay between the two
// ({p99, max} in ms), so the bench can watch the web process while a worker renders an archive.
import express from 'express';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import pg from 'pg';
import type { AddressInfo } from 'node:net';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { createKnex } from '../../server/db/knex';

const role = process.argv[2];
let app: express.Express;
if (role === 'app') {
  const config = loadConfig();
  app = createApp({ knex: createKnex(config.DATABASE_URL), config }).app;
} else if (role === 'baseline') {
  const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 10 });
  const { rows } = await pool.query<{ n: number }>('SELECT max(id)::int AS n FROM orders');
  const maxId = Math.max(1, rows[0].n);
  app = express();
  app.get('/order', async (_req, res) => {
    const id = 1 + Math.floor(Math.random() * maxId);
    const r = await pool.query('SELECT id, number, state, total_cents FROM orders WHERE id = $1', [id]);
    res.json({ order: r.rows[0] ?? null });
  });
} else {
  throw new Error('usage: api-servers.ts app|baseline');
}
const server = app.listen(0, '127.0.0.1', () => {
  console.log(JSON.stringify({ port: (server.address() as AddressInfo).port }));
});
process.on('SIGTERM', () => process.exit(0));
if (role === 'app' && process.send) {
  const delay = monitorEventLoopDelay({ resolution: 5 });
  process.on('message', (message) => {
    if (message === 'loop:start') {
      delay.reset();
      delay.enable();
    } else if (message === 'loop:stop') {
      delay.disable();
      process.send!({ p99: delay.percentile(99) / 1e6, max: delay.max / 1e6 });
    }
  });
}
