// Jobs section of `npm run bench`: how soon a requested sheet archive starts (woken on commit, and
// by the timer alone), and how soon another worker carries on after one is killed with SIGKILL.
// Needs DATABASE_URL (a migrated, seeded database such as kneepoint_test); prints figures only.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Knex } from 'knex';
import { loadConfig } from '../../server/config';
import { createKnex } from '../../server/db/knex';
import { startJobs } from '../../server/jobs/boss';
import { outboxJob } from '../../server/jobs/outbox-worker';
import { specSheetJob } from '../../server/jobs/spec-sheets';
import { startMailFake } from '../../server/fakes/mail';
import { enqueueMail } from '../../server/services/mail/outbox';
import { wakeJob } from '../../server/jobs/wake';
import { SHEET_JOBS_LOOP, STALE_AFTER_SECONDS } from '../../server/services/spec-sheets/batch-jobs';
import { insertBatch } from '../../tests/api/spec-sheets-setup';
import type { BenchSection } from './engine';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function until<T>(check: () => Promise<T | false | undefined>, timeoutMs: number, everyMs = 2): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > deadline) throw new Error('bench: timed out');
    await sleep(everyMs);
  }
}

/** Requests a sheet job (optionally waking the workers) and returns ms until a worker has claimed it. */
async function pickup(knex: Knex, batchId: number, wake: boolean) {
  const t0 = performance.now();
  const id = await knex.transaction(async (trx) => {
    const [row] = await trx('sheet_jobs').insert({ batch_id: batchId, total: 1 }).returning('id');
    if (wake) await wakeJob(trx, SHEET_JOBS_LOOP);
    return row.id as number;
  });
  await until(async () => (await knex('sheet_jobs').where({ id }).first('state')).state !== 'queued', 10_000);
  const ms = performance.now() - t0;
  await until(async () => (await knex('sheet_jobs').where({ id }).first('state')).state === 'finished', 120_000, 50);
  return ms;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

export const jobsSection: BenchSection = {
  key: 'jobs',
  name: 'jobs',
  run: async () => {
    console.log('\n## Jobs (sheet archive pickup; takeover after a worker is killed)');
    if (!process.env.DATABASE_URL) {
      console.log('skipped: set DATABASE_URL to a migrated, seeded database (e.g. kneepoint_test)');
      return;
    }
    const env = { NODE_ENV: 'test', SESSION_SECRET: 'test-secret-bench-not-for-production', ...process.env };
    const config = loadConfig(env);
    const knex = createKnex(config.DATABASE_URL, 4);
    try {
      const small = await insertBatch(knex, [{ vf: [1.79, 0.6] }]);
      let jobs = await startJobs(config, [specSheetJob(knex, config)]);
      await pickup(knex, small.batchId, true); // warm-up
      const woken: number[] = [];
      const timed: number[] = [];
      for (let i = 0; i < 5; i++) woken.push(await pickup(knex, small.batchId, true));
      for (let i = 0; i < 3; i++) timed.push(await pickup(knex, small.batchId, false));
      console.log(`pickup, woken on commit: ${median(woken).toFixed(0)} ms median, ${Math.max(...woken).toFixed(0)} ms max (5 jobs)`);
      console.log(`pickup, timer only (a missed wake-up): ${median(timed).toFixed(0)} ms median (3 jobs)`);
      await jobs.stop();

      // Mail: queued in a transaction, sent by a worker's outbox loop to a local mail fake.
      const mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
      const mailConfig = loadConfig({ ...env, SMTP_PORT: String(mail.smtpPort), OUTBOX_POLL_SECONDS: '2' });
      jobs = await startJobs(mailConfig, [outboxJob(knex, mailConfig)]);
      const sent: number[] = [];
      for (let i = 0; i < 5; i++) {
        const to = `bench-${process.pid}-${Date.now()}-${i}@bench.example`;
        const t0 = performance.now();
        await knex.transaction((trx) => enqueueMail(trx, { dedupeKey: `bench:${to}`, template: 'welcome', to, data: { name: 'Bench' } }));
        await until(async () => (await knex('outbox').where({ to_address: to }).first('status')).status === 'sent', 30_000);
        sent.push(performance.now() - t0);
      }
      console.log(`mail queued → sent over SMTP: ${median(sent).toFixed(0)} ms median (5 mails; the sweep timer alone is ${mailConfig.OUTBOX_POLL_SECONDS} s)`);
      await jobs.stop();
      await mail.close();

      // A worker process takes a 12-unit archive; it is killed after its first unit; this process carries on.
      const batch = await insertBatch(knex, Array.from({ length: 12 }, (_, i) => ({ vf: [1.78 + i * 0.005, 0.6] })));
      const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/serve.ts', 'worker'], { cwd: ROOT, env, stdio: 'ignore' });
      const [job] = await knex('sheet_jobs').insert({ batch_id: batch.batchId, total: 12 }).returning('id');
      const first = await until(async () => {
        const row = await knex('sheet_jobs').where({ id: job.id }).first('done', 'lease_token');
        return row.done >= 1 && row;
      }, 300_000, 5);
      child.kill('SIGKILL');
      const killedAt = performance.now();
      jobs = await startJobs(config, [specSheetJob(knex, config)]);
      await until(async () => knex('sheet_job_units').where({ job_id: job.id }).whereNot({ lease_token: first.lease_token }).first('unit_id'), 120_000, 20);
      const resumed = (performance.now() - killedAt) / 1000;
      await until(async () => (await knex('sheet_jobs').where({ id: job.id }).first('state')).state === 'finished', 300_000, 50);
      const again = await knex('sheet_job_units').where({ job_id: job.id }).count({ n: '*' }).first();
      console.log(`killed worker: next unit done by another worker ${resumed.toFixed(1)} s after the kill (lease stale after ${STALE_AFTER_SECONDS} s); ${again?.n}/12 units, each once`);
      await jobs.stop();
    } finally {
      await knex.destroy();
    }
  },
};
