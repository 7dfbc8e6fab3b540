// `npm run bench -- api [--scale 5]`: HTTP load on every list route over a production-size
// dataset, against a bare Express + pg baseline measured in the same run. Only 127.0.0.1, 50
// connections, 10 s a route (KP_BENCH_SECONDS overrides, KP_BENCH_ROUTES picks routes by
// substring), each after 2 s of the same load unmeasured. The app runs as production does, with its
// response cache on (server/http/response-cache.ts); then every route again with it off
// (KP_BENCH_UNCACHED=0 skips that pass), which is what a request costs right after a write. Then
// the web process's event-loop delay while a worker process (the product's own,
// `scripts/serve.ts worker`) renders a 100-unit spec-sheet archive requested through the API.
// Prints figures and targets; asserts nothing.
import autocannon from 'autocannon';
import { spawn, type ChildProcess } from 'node:child_process';
import http from 'node:http';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { createKnex } from '../../server/db/knex';
import { createBatch } from '../../server/services/production/planning';
import { releaseBatch } from '../../server/services/production/release';
import { benchDatabaseUrl, ensureDataset, scaleFromArgs } from './dataset';
import type { BenchSection } from './engine';
import { pollHealth } from './health-poll';
import { benchAppEnv, benchBatch, benchRoutes, signInAll, signInWithToken, type Cookies, type Route } from './api-routes';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const CONNECTIONS = 50;
const SECONDS = Number(process.env.KP_BENCH_SECONDS ?? 10);
// Each server (baseline and app) and each route first gets this long of the same load, unmeasured,
// so neither side is timed while V8 is still compiling its code.
const WARMUP_SECONDS = 2;
const TARGET_RATIO = 3;
const TARGET_PAGE_GZIP = 64 * 1024;
const ARCHIVE_UNITS = 100;
const ARCHIVE_NOTE = 'api bench: 100-unit spec-sheet archive';
const TARGET_LOOP_P99_MS = 50;

/** Starts one of the two servers in its own process and waits for its port. */
async function startServer(role: 'app' | 'baseline', env: NodeJS.ProcessEnv): Promise<{ child: ChildProcess; base: string }> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/bench/api-servers.ts', role], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'inherit', 'ipc'] });
  const lines = createInterface({ input: child.stdout! });
  const port = await new Promise<number>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`${role} server did not start in 60 s`)), 60_000);
    child.once('exit', (code) => reject(new Error(`${role} server exited with ${code}`)));
    lines.once('line', (line) => { clearTimeout(timer); resolve(JSON.parse(line).port); });
  });
  return { child, base: `http://127.0.0.1:${port}` };
}

/** Raw GET with the benchmark's headers: status, bytes on the wire and their encoding. */
function fetchRaw(url: string, headers: Record<string, string>): Promise<{ status: number; body: Buffer; encoding: string }> {
  return new Promise((resolve, reject) => {
    http.get(url, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body: Buffer.concat(chunks), encoding: String(res.headers['content-encoding'] ?? 'identity') }));
    }).on('error', reject);
  });
}

/**
 * A released batch of 100 units (25 of each of four options of a demo model) whose sheets the
 * archive measurement renders. Made once in the dataset and kept, so every run's board sees it.
 */
async function ensureArchiveBatch(url: string): Promise<number> {
  const knex = createKnex(url, 2);
  try {
    const existing = await knex('batches').where({ notes: ARCHIVE_NOTE }).whereNot('state', 'cancelled').first('id');
    if (existing) return existing.id as number;
    const model = await knex('models as m').whereNotNull('m.active_revision_id')
      .whereRaw('(SELECT COUNT(*) FROM clipping_options c WHERE c.model_id = m.id) >= 4').orderBy('m.sku').first('m.id', 'm.active_revision_id');
    const options = await knex('clipping_options').where({ model_id: model.id }).orderBy(['position', 'id']).limit(4);
    const planner = await knex('users').where({ email: 'planner@shop.example' }).first('id');
    const { id } = await createBatch(knex, planner.id, {
      revisionId: model.active_revision_id, orderLineIds: [], notes: ARCHIVE_NOTE,
      stockBuilds: options.map((o) => ({ optionId: o.id, quantity: ARCHIVE_UNITS / 4 })),
    });
    await releaseBatch(knex, planner.id, id, { overrideReason: 'api bench: stock not checked' }, '', ARCHIVE_UNITS);
    return id as number;
  } finally {
    await knex.destroy();
  }
}

/** The web process's event-loop delay (p99 and max, ms) and /api/health latencies while `work` runs. */
async function watchWeb(app: ChildProcess, base: string, work: () => Promise<void>) {
  const polling = pollHealth(base);
  const reply = new Promise<{ p99: number; max: number }>((resolve) => app.once('message', (m) => resolve(m as { p99: number; max: number })));
  app.send('loop:start');
  const started = performance.now();
  await work();
  const seconds = (performance.now() - started) / 1000;
  app.send('loop:stop');
  const loop = await reply;
  const health = await polling.stop();
  health.sort((a, b) => a - b);
  return { ...loop, seconds, healthP95: quantile(health, 0.95), polls: health.length };
}

/**
 * Requests the archive of the 100-unit batch through the API and waits for a worker process to
 * finish it, watching the web process meanwhile; prints one line and returns the p99.
 */
async function archiveUnderWatch(app: { child: ChildProcess; base: string }, env: NodeJS.ProcessEnv, url: string, batchId: number) {
  const knex = createKnex(url, 1);
  // Cold, as the first archive of a new option is: the option's Monte Carlo band is computed too.
  await knex('sheet_band_cache').delete();
  const worker = spawn(process.execPath, ['--import', 'tsx', 'scripts/serve.ts', 'worker'], { cwd: ROOT, env: { ...env, KP_ROLE: 'worker' }, stdio: ['ignore', 'pipe', 'inherit'] });
  try {
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error('the worker did not start in 60 s')), 60_000);
      worker.once('exit', (code) => reject(new Error(`the worker exited with ${code}`)));
      createInterface({ input: worker.stdout! }).on('line', (line) => { if (line.includes('is running the background jobs')) { clearTimeout(timer); resolve(); } });
    });
    const floor = await watchWeb(app.child, app.base, () => new Promise((resolve) => setTimeout(resolve, 3000)));
    const planner = await signInWithToken(app.base, 'planner@shop.example');
    let jobState = '';
    const watched = await watchWeb(app.child, app.base, async () => {
      const res = await fetch(`${app.base}/api/batches/${batchId}/spec-sheets`, { method: 'POST', headers: { cookie: planner.cookie, 'x-csrf-token': planner.csrf } });
      if (res.status >= 300) throw new Error(`requesting the archive answered ${res.status}`);
      const { job } = (await res.json()) as { job: { id: number } };
      for (;;) {
        await new Promise((resolve) => setTimeout(resolve, 500));
        const poll = await fetch(`${app.base}/api/spec-sheet-jobs/${job.id}`, { headers: { cookie: planner.cookie } });
        jobState = ((await poll.json()) as { job: { state: string } }).job.state;
        if (jobState !== 'queued' && jobState !== 'running') return;
      }
    });
    console.log(`api archive of ${ARCHIVE_UNITS} units in a worker process: ${jobState} in ${watched.seconds.toFixed(1)} s; web event-loop p99 ${watched.p99.toFixed(0)} ms, max ${watched.max.toFixed(0)} ms` +
      ` (idle floor p99 ${floor.p99.toFixed(0)} ms); /api/health p95 ${ms(watched.healthP95)} ms over ${watched.polls} polls — target p99 < ${TARGET_LOOP_P99_MS} ms ${watched.p99 < TARGET_LOOP_P99_MS ? 'met' : 'NOT met'}`);
  } finally {
    worker.kill('SIGTERM');
    await new Promise((resolve) => { if (worker.exitCode !== null) resolve(null); else worker.once('exit', resolve); });
    // The archive and its per-unit rows are the bench's own: leave the dataset as it was.
    const files = await knex('sheet_jobs').where({ batch_id: batchId }).whereNotNull('archive_file_id').pluck('archive_file_id');
    await knex('sheet_job_units').whereIn('job_id', knex('sheet_jobs').where({ batch_id: batchId }).select('id')).delete();
    await knex('sheet_jobs').where({ batch_id: batchId }).delete();
    if (files.length) await knex('files').whereIn('id', files).delete();
    await knex.destroy();
  }
}

const quantile = (sorted: number[], q: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] : NaN);

/** 50 connections for SECONDS against one URL, after WARMUP_SECONDS unmeasured; latencies from every finished response. */
async function load(url: string, headers: Record<string, string>) {
  await new Promise((resolve, reject) => autocannon({ url, connections: CONNECTIONS, duration: WARMUP_SECONDS, headers }, (e, r) => (e ? reject(e) : resolve(r))));
  const times: number[] = [];
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers, timeout: SECONDS + 5 }, (error, r) => (error ? reject(error) : resolve(r)));
    instance.on('response', (_client, _status, _bytes, responseTime) => times.push(responseTime));
  });
  times.sort((a, b) => a - b);
  return {
    p50: quantile(times, 0.5), p95: quantile(times, 0.95), rps: times.length / SECONDS,
    non2xx: result.non2xx, errors: result.errors, timeouts: result.timeouts,
  };
}

const kib = (bytes: number) => `${(bytes / 1024).toFixed(1)} KiB`;
const ms = (x: number) => (Number.isNaN(x) ? 'none finished' : x < 10 ? x.toFixed(1) : x.toFixed(0));

/** Loads each route in turn, printing one line each; returns the worst p95 ratio against the baseline's. */
async function loadRoutes(base: string, cookies: Cookies, routes: Route[], baseP95: number, tag: string) {
  let worst = { ratio: 0, label: '' };
  for (const route of routes) {
    const headers = { cookie: cookies[route.as], 'accept-encoding': 'gzip' };
    const one = await fetchRaw(base + route.path, headers);
    const raw = one.encoding === 'gzip' ? (await import('node:zlib')).gunzipSync(one.body).length : one.body.length;
    const gzip = one.encoding === 'gzip' ? one.body.length : gzipSync(one.body).length;
    const r = await load(base + route.path, headers);
    // A route where no request finished counts as the whole run plus the timeout.
    const ratio = (Number.isNaN(r.p95) ? (SECONDS + 5) * 1000 : r.p95) / baseP95;
    if (!(ratio <= worst.ratio)) worst = { ratio, label: route.label };
    const trouble = [r.non2xx ? `${r.non2xx} non-2xx` : '', r.errors ? `${r.errors} errors` : '', r.timeouts ? `${r.timeouts} timeouts` : '', one.status !== 200 ? `status ${one.status}` : ''].filter(Boolean).join(', ');
    console.log(`api ${route.label}${tag} p50 ${ms(r.p50)} p95 ${ms(r.p95)} ms, ${r.rps.toFixed(1)} req/s, ratio ${ratio.toFixed(1)}` +
      ` | size raw ${kib(raw)}, gzip ${kib(gzip)} (${one.encoding === 'gzip' ? 'sent gzip' : 'sent uncompressed'})` +
      `${gzip > TARGET_PAGE_GZIP ? ' OVER 64 KiB' : ''}${trouble ? ` | ${trouble}` : ''}`);
  }
  return worst;
}

async function runApiBench() {
  const argv = process.argv.slice(2);
  const scale = scaleFromArgs(argv);
  const url = benchDatabaseUrl();
  console.log(`\n## API under load (${CONNECTIONS} connections, ${SECONDS} s a route, scale ${scale})`);
  const dataset = await ensureDataset(url, scale);
  const archiveBatch = await ensureArchiveBatch(url);
  const knex = createKnex(url, 1);
  const batch = await benchBatch(knex);
  await knex.destroy();
  const env = {
    ...benchAppEnv(url),
    // Nothing listens there: the bench's worker must not deliver the dataset's mail anywhere.
    SMTP_PORT: '1',
  };
  const app = await startServer('app', env);
  const baseline = await startServer('baseline', env);
  try {
    const cookies = await signInAll(app.base);
    const routes = benchRoutes(batch);

    const base = await load(`${baseline.base}/order`, {});
    console.log(`api baseline (bare Express + pg, one primary-key lookup) p50 ${ms(base.p50)} p95 ${ms(base.p95)} ms, ${base.rps.toFixed(0)} req/s`);
    const worst = await loadRoutes(app.base, cookies, routes, base.p95, '');
    console.log(`api: worst p95 ratio ${worst.ratio.toFixed(1)} (${worst.label}) at ${CONNECTIONS} connections, ${dataset.units} units` +
      ` — target ≤ ${TARGET_RATIO} for every route, no page over 64 KiB gzip`);
    // The same routes with the response cache off: what every request costs when it computes its
    // answer (as the first request after each write does). Figures, not the target.
    if (process.env.KP_BENCH_UNCACHED !== '0') {
      const uncached = await startServer('app', { ...env, RESPONSE_CACHE: 'false' });
      try {
        const plain = await loadRoutes(uncached.base, await signInAll(uncached.base), routes, base.p95, ' (response cache off)');
        console.log(`api: worst p95 ratio with the response cache off ${plain.ratio.toFixed(1)} (${plain.label})`);
      } finally {
        uncached.child.kill('SIGTERM');
      }
    }
    if (process.env.KP_BENCH_ARCHIVE !== '0') await archiveUnderWatch(app, env, url, archiveBatch);
  } finally {
    app.child.kill('SIGTERM');
    baseline.child.kill('SIGTERM');
  }
}

export const apiSection: BenchSection = { key: 'api', name: 'api', run: runApiBench };
