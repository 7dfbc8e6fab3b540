// Runs one Kneepoint process in the role KP_ROLE names (or the first argument): `web` serves the
// API and the built client, `worker` runs the background jobs, `all` (the default) does both.
import { loadConfig } from '../server/config';
import { createKnex } from '../server/db/knex';
import { closeComputePool, startComputePool } from '../server/compute/pool';
import type { Running } from '../server/roles/web';

const role = process.argv[2];
const config = loadConfig(role ? { ...process.env, KP_ROLE: role } : process.env);
const knex = createKnex(config.DATABASE_URL);
const parts: Running[] = [];
// Engine and PDF work runs in worker threads in both roles; start them now, not on the first request.
startComputePool();

let stopping: Promise<void> | null = null;
// Web first (no new requests, in-flight ones drained), then the jobs, then the database pool: each once.
const stop = () => (stopping ??= (async () => {
  for (const part of parts) await part.stop();
  await closeComputePool();
  await knex.destroy();
})().then(() => process.exit(0), (error) => {
  console.error('[kneepoint] stopping failed:', error);
  process.exit(1);
}));
process.on('SIGTERM', () => void stop());
process.on('SIGINT', () => void stop());
// Under `npm start` the supervisor holds an IPC channel: if it goes away, so does this process.
if (process.send) {
  process.on('disconnect', () => void stop());
  process.channel?.unref();
}

const banner = () => {
  const accounts = ['owner', 'planner', 'assembler', 'tester', 'customer'].map((r) => `    ${r}@shop.example`).join('\n');
  console.log(`
[kneepoint] Kneepoint is up at ${config.publicUrl}
[kneepoint] demo accounts (password: kneepoint-demo):
${accounts}
[kneepoint] Ctrl-C stops everything; data stays in .data/.`);
};

try {
  // Each role loads only its own modules (a worker never loads the HTTP app, a web process no job code).
  if (config.KP_ROLE !== 'worker') {
    const { startWeb } = await import('../server/roles/web');
    parts.push(await startWeb(config, knex, banner));
  }
  if (config.KP_ROLE !== 'web') {
    const { startWorker } = await import('../server/roles/worker');
    parts.push(await startWorker(config, knex));
    if (config.KP_ROLE === 'worker') console.log(`[kneepoint] worker ${process.pid} is running the background jobs.`);
  }
} catch (error) {
  const e = error as NodeJS.ErrnoException;
  console.error(e.code === 'EADDRINUSE' ? `[kneepoint] port ${config.PORT} is taken (PORT overrides).` : e);
  process.exit(1);
}
