// A worker process killed with SIGKILL in the middle of a batch's sheet archive: another worker
// takes the job over within 60 s, resumes at the next unit, and no unit is done twice.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { wakeJob } from '../../server/jobs/wake';
import { SHEET_JOBS_LOOP } from '../../server/services/spec-sheets/batch-jobs';
import { startTestApp } from '../support/app';
import { insertBatch, userId } from '../api/spec-sheets-setup';
import { exited, killChildren, printed, startRole, waitFor, WORKER_READY } from './support';

const t = startTestApp();
afterAll(async () => {
  await killChildren();
  await t.stop();
});

const UNITS = 8;

function zipEntries(zip: Buffer) {
  const dir = mkdtempSync(path.join(tmpdir(), 'kneepoint-zip-'));
  const file = path.join(dir, 'sheets.zip');
  writeFileSync(file, zip);
  return execFileSync('unzip', ['-Z1', file], { encoding: 'utf8' }).trim().split('\n');
}

describe('a sheet job whose worker is killed', () => {
  it('is taken over by another worker within 60 s and resumes at the next unit', async () => {
    // Passed units: each one's sheet is stored (spec_sheets + files) as the job goes.
    const batch = await insertBatch(t.knex, Array.from({ length: UNITS }, (_, i) => ({ vf: [1.78 + i * 0.01, 0.6], state: 'passed' as const })));
    const unitIds = batch.units.map((u) => u.id);
    const planner = await userId(t.knex, 'planner@shop.example');
    const first = startRole('worker', 'takeover-worker-a');
    await printed(first, WORKER_READY, 180_000);
    const [job] = await t.knex('sheet_jobs').insert({ batch_id: batch.batchId, total: UNITS, requested_by: planner }).returning('id');
    await wakeJob(t.knex, SHEET_JOBS_LOOP);

    // Once A has done two units it is frozen mid-job (SIGSTOP: no more units, no heartbeat), a second
    // worker starts (as under npm start's supervisor or on a second machine), and when that one is up
    // A is killed. What is timed is the takeover, not how long a cold process takes to start.
    await waitFor('worker A to do two units', async () => (await t.knex('sheet_jobs').where({ id: job.id }).first('done')).done >= 2, 90_000, 20);
    first.child.kill('SIGSTOP');
    // What A had committed when it froze (a commit already sent reaches PostgreSQL within moments).
    await new Promise((resolve) => setTimeout(resolve, 500));
    const atKill = await t.knex('sheet_jobs').where({ id: job.id }).first('state', 'done', 'lease_token');
    const second = startRole('worker', 'takeover-worker-b');
    await printed(second, WORKER_READY, 180_000);
    first.child.kill('SIGKILL');
    await exited(first.child);
    const killedAt = Date.now();
    expect(atKill.state).toBe('running');
    expect(atKill.done).toBeLessThan(UNITS); // killed mid-job, not after it
    const leaseA = atKill.lease_token as string;

    const finished = await waitFor('another worker to finish the job', async () => {
      const row = await t.knex('sheet_jobs').where({ id: job.id }).first();
      return row.state === 'finished' && row;
    }, 90_000, 200);
    const units = await t.knex('sheet_job_units').where({ job_id: job.id }).select('unit_id', 'lease_token', 'made_at', 'failure');
    const resumedAt = Math.min(...units.filter((u) => u.lease_token !== leaseA).map((u) => new Date(u.made_at).getTime()));
    console.log(`[takeover] worker killed after ${atKill.done}/${UNITS} units; next unit done by another worker ${((resumedAt - killedAt) / 1000).toFixed(1)} s later`);
    expect(resumedAt - killedAt).toBeLessThan(60_000);

    // Resumed, not restarted: A's units kept, the rest done once by B's lease, every unit exactly once.
    expect(finished).toMatchObject({ total: UNITS, done: UNITS, lease_token: null });
    expect(units.map((u) => u.unit_id).sort((a, b) => a - b)).toEqual([...unitIds].sort((a, b) => a - b));
    expect(units.filter((u) => u.lease_token === leaseA)).toHaveLength(atKill.done);
    expect(new Set(units.map((u) => u.lease_token)).size).toBe(2);
    expect(units.filter((u) => u.failure)).toEqual([]);
    // Each unit's sheet stored once: one spec_sheets row and one sheet file per serial.
    expect(await t.knex('spec_sheets').whereIn('unit_id', unitIds).count({ n: '*' }).first()).toEqual({ n: UNITS });
    const files = await t.knex('files').where({ purpose: 'spec-sheet' }).whereIn('filename', batch.units.map((u) => `spec-sheet-${u.serial}.pdf`)).select('filename');
    expect(files).toHaveLength(UNITS);
    // The archive holds each unit once.
    const archive = await t.knex('files').where({ id: finished.archive_file_id }).first('data');
    expect(zipEntries(archive.data).sort()).toEqual(batch.units.map((u) => `${u.serial}.pdf`).sort());
    second.child.kill('SIGTERM');
    await exited(second.child);
    expect(second.child.exitCode).toBe(0);
  }, 420_000);
});
