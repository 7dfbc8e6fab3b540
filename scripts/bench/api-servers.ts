// The two servers `npm run bench -- api` measures, each run as its own process so the load
// generator never shares their event loop: `app` is the product as production runs it (no job
// workers), `baseline` a bare Express 5 + pg server doing one primary-key lookup per request.
// Each listens on 127.0.0.1 on a free port and prints `{"port": N}` on its first line.
import express from 'express';
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
