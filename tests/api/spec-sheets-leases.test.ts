// Sheet job leases (server/services/spec-sheets/sheet-leases.ts): a worker that stops gives its job
// back with its progress, the next claim resumes at the next unit, and a worker whose lease was
// taken over (it was slow, not dead) writes nothing more.
import { afterAll, describe, expect, it } from 'vitest';
import { claimSheetJob, runSheetJob, STALE_AFTER_SECONDS } from '../../server/services/spec-sheets/batch-jobs';
import { sweepExpired } from '../../server/jobs/housekeeping';
import { startTestApp } from '../support/app';
import { insertBatch } from './spec-sheets-setup';

const t = startTestApp();
afterAll(() => t.stop());

/** Claims until it gets `jobId` (other tests' leftover jobs are given back untouched). */
async function claim(jobId: number) {
  for (;;) {
    const job = await claimSheetJob(t.knex);
    if (!job) throw new Error(`job ${jobId} was not claimable`);
    if (job.id === jobId) return job;
    await t.knex('sheet_jobs').where({ id: job.id }).update({ state: 'queued', lease_token: null });
  }
}

describe('sheet job leases', () => {
  it('a stopping worker gives the job back after the current unit, and the next worker resumes there', async () => {
    const batch = await insertBatch(t.knex, [{ vf: [1.79, 0.6] }, { vf: [1.8, 0.6] }, { vf: [1.81, 0.6] }]);
    const [row] = await t.knex('sheet_jobs').insert({ batch_id: batch.batchId, total: 3 }).returning('id');
    const first = await claim(row.id);
    const stop = new AbortController();
    // Stop once the first unit is recorded (the worker checks the signal between units).
    const watcher = setInterval(() => {
      void t.knex('sheet_job_units').where({ job_id: row.id }).first('unit_id').then((u) => u && stop.abort());
    }, 5);
    await runSheetJob(t.knex, row.id, first.lease, undefined, stop.signal);
    clearInterval(watcher);
    const given = await t.knex('sheet_jobs').where({ id: row.id }).first();
    expect(given).toMatchObject({ state: 'queued', lease_token: null });
    expect(given.done).toBeGreaterThanOrEqual(1);
    expect(given.done).toBeLessThan(3);

    const second = await claim(row.id);
    await runSheetJob(t.knex, row.id, second.lease);
    const units = await t.knex('sheet_job_units').where({ job_id: row.id }).select('unit_id', 'lease_token');
    expect(units).toHaveLength(3);
    expect(units.filter((u) => u.lease_token === first.lease)).toHaveLength(given.done);
    expect(units.filter((u) => u.lease_token === second.lease)).toHaveLength(3 - given.done);
    expect(await t.knex('sheet_jobs').where({ id: row.id }).first('state', 'done')).toEqual({ state: 'finished', done: 3 });
  });

  it('a worker whose lease was taken over stops without writing a unit', async () => {
    const batch = await insertBatch(t.knex, [{ vf: [1.79, 0.6] }, { vf: [1.8, 0.6] }]);
    const [row] = await t.knex('sheet_jobs').insert({ batch_id: batch.batchId, total: 2 }).returning('id');
    const slow = await claim(row.id);
    // Its heartbeat went quiet long enough: another worker claims the job.
    await t.knex('sheet_jobs').where({ id: row.id }).update({ heartbeat_at: new Date(Date.now() - (STALE_AFTER_SECONDS + 5) * 1000) });
    const other = await claim(row.id);
    expect(other.lease).not.toBe(slow.lease);
    await runSheetJob(t.knex, row.id, slow.lease);
    expect(await t.knex('sheet_job_units').where({ job_id: row.id })).toEqual([]);
    expect(await t.knex('sheet_jobs').where({ id: row.id }).first('state', 'lease_token')).toEqual({ state: 'running', lease_token: other.lease });
    await runSheetJob(t.knex, row.id, other.lease);
    expect(await t.knex('sheet_job_units').where({ job_id: row.id, lease_token: other.lease }).count({ n: '*' }).first()).toEqual({ n: 2 });
  });
});

describe('housekeeping', () => {
  it('deletes expired sessions and finished rate-limit windows, keeping live ones', async () => {
    const tag = `hk-${process.pid}-${Date.now()}`;
    await t.knex('session').insert([
      { sid: `${tag}-old`, sess: JSON.stringify({ cookie: {} }), expire: new Date(Date.now() - 60_000) },
      { sid: `${tag}-live`, sess: JSON.stringify({ cookie: {} }), expire: new Date(Date.now() + 3_600_000) },
    ]);
    await t.knex('rate_limits').insert([
      { key: `${tag}-old`, hits: 3, reset_at: new Date(Date.now() - 60_000) },
      { key: `${tag}-live`, hits: 1, reset_at: new Date(Date.now() + 600_000) },
    ]);
    const swept = await sweepExpired(t.knex);
    expect(swept.sessions).toBeGreaterThanOrEqual(1);
    expect(swept.rateLimits).toBeGreaterThanOrEqual(1);
    expect((await t.knex('session').where('sid', 'like', `${tag}%`).pluck('sid')).sort()).toEqual([`${tag}-live`]);
    expect((await t.knex('rate_limits').where('key', 'like', `${tag}%`).pluck('key')).sort()).toEqual([`${tag}-live`]);
  });
});
