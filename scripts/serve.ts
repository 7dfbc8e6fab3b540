// Serves the product: the API and the built client from one Express process.
import { loadConfig } from '../server/config';
import { createKnex } from '../server/db/knex';
import { createApp } from '../server/app';
import { startComputePool } from '../server/compute/pool';
import { startJobs } from '../server/jobs/boss';
import { kickOutbox, outboxJob } from '../server/jobs/outbox-worker';
import { kickSpecSheets, specSheetJob } from '../server/jobs/spec-sheets';
import { stockCheckJob } from '../server/jobs/stock-check';
import { kickReleases, releaseJob } from '../server/jobs/releases';

const config = loadConfig();
const knex = createKnex(config.DATABASE_URL);
const { app, close } = createApp({ knex, config });
startComputePool();
// Background jobs (pg-boss on the same PostgreSQL): the mail outbox; other areas add theirs to this list.
const jobs = await startJobs(config, [outboxJob(knex, config), specSheetJob(knex, config), stockCheckJob(knex), releaseJob(knex, config)]);
await kickOutbox(jobs.boss);
await kickSpecSheets(jobs.boss);
await kickReleases(jobs.boss);
const server = app.listen(config.PORT, config.HOST, () => {
  const accounts = ['owner', 'planner', 'assembler', 'tester', 'customer'].map((r) => `    ${r}@shop.example`).join('\n');
  console.log(`
[kneepoint] Kneepoint is up at ${config.publicUrl}
[kneepoint] demo accounts (password: kneepoint-demo):
${accounts}
[kneepoint] Ctrl-C stops everything; data stays in .data/.`);
});
server.on('error', (error: NodeJS.ErrnoException) => {
  console.error(error.code === 'EADDRINUSE' ? `[kneepoint] port ${config.PORT} is taken (PORT overrides).` : error);
  process.exit(1);
});
const shutdown = () => {
  server.close(() => void jobs.stop().then(() => Promise.all([close(), knex.destroy()])).then(() => process.exit(0)));
  setTimeout(() => process.exit(0), 3000).unref();
};
process.on('SIGTERM', shutdown);
process.on('SIGINT', shutdown);
