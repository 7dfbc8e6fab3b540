import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { startJobs } from '../../server/jobs/boss';
import { specSheetJob } from '../../server/jobs/spec-sheets';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { fetchBinary, insertBatch } from './spec-sheets-setup';

const t = startTestApp();
let jobs: Awaited<ReturnType<typeof startJobs>> | null = null;
afterAll(async () => {
  await jobs?.stop();
  await t.stop();
});

/** The entries of a zip, listed by Debian's unzip (`unzip -Z1` prints one name a line). */
function zipEntries(zip: Buffer) {
  const dir = mkdtempSync(path.join(tmpdir(), 'kneepoint-zip-'));
  const file = path.join(dir, 'sheets.zip');
  writeFileSync(file, zip);
  return execFileSync('unzip', ['-Z1', file], { encoding: 'utf8' }).trim().split('\n').sort();
}

describe('a batch of spec sheets as a background job', () => {
  it('reports progress, notes a failing unit by serial, and keeps the others in one archive', async () => {
    // Three units: one passed, one built, one with an impossible reading (9.5 V on a silicon diode) that the engine refuses.
    const batch = await insertBatch(t.knex, [{ vf: [1.792, 0.603], state: 'passed' }, { vf: [1.861, 0.571] }, { vf: [1.80, 9.5] }]);
    const [good, built, broken] = batch.units;
    const planner = await signedInAgent(t.app, DEMO.planner);

    const started = await planner.post(`/api/batches/${batch.batchId}/spec-sheets`).set('X-CSRF-Token', planner.csrf).expect(202);
    const jobId = started.body.job.id as number;
    expect(started.body.job).toMatchObject({ state: 'queued', total: 3, done: 0, archiveReady: false });
    // Asking again while it waits gives the same job, not a second one.
    const again = await planner.post(`/api/batches/${batch.batchId}/spec-sheets`).set('X-CSRF-Token', planner.csrf).expect(202);
    expect(again.body.job.id).toBe(jobId);
    // A page that reloads finds it through the batch.
    expect((await planner.get(`/api/batches/${batch.batchId}/spec-sheets/latest`).expect(200)).body.job.id).toBe(jobId);
    await planner.get(`/api/spec-sheet-jobs/${jobId}/archive.zip`).expect(409);

    jobs = await startJobs(t.config, [specSheetJob(t.knex, t.config, 0.5)]);
    const seen: { state: string; done: number }[] = [];
    const deadline = Date.now() + 60_000;
    let job = started.body.job;
    while (job.state !== 'finished' && job.state !== 'failed' && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 40));
      job = (await planner.get(`/api/spec-sheet-jobs/${jobId}`).expect(200)).body.job;
      seen.push({ state: job.state, done: job.done });
    }
    expect(job).toMatchObject({ state: 'finished', total: 3, done: 3, archiveReady: true });
    // Progress only ever moves forward.
    for (let i = 1; i < seen.length; i++) expect(seen[i].done).toBeGreaterThanOrEqual(seen[i - 1].done);
    expect(job.failures).toHaveLength(1);
    expect(job.failures[0].serial).toBe(broken.serial);
    expect(job.failures[0].reason).toMatch(/measured/);

    const { body, headers } = await fetchBinary(planner, `/api/spec-sheet-jobs/${jobId}/archive.zip`);
    expect(headers['content-type']).toBe('application/zip');
    expect(zipEntries(body)).toEqual([`${good.serial}.pdf`, `${built.serial}.pdf`, 'units-without-a-sheet.txt'].sort());
    // The passed unit's sheet is now stored; the built one's was made on demand only.
    expect(await t.knex('spec_sheets').where({ unit_id: good.id }).first()).toBeTruthy();
    expect(await t.knex('spec_sheets').where({ unit_id: built.id }).first()).toBeUndefined();
  });

  it('takes over a job whose worker stopped mid-way (its heartbeat went quiet)', async () => {
    const batch = await insertBatch(t.knex, [{ vf: [1.79, 0.60] }]);
    const [stale] = await t.knex('sheet_jobs').insert({
      batch_id: batch.batchId, state: 'running', total: 1, done: 0, started_at: new Date(Date.now() - 600_000), heartbeat_at: new Date(Date.now() - 600_000),
    }).returning('id');
    if (!jobs) {
      jobs = await startJobs(t.config, [specSheetJob(t.knex, t.config, 0.5)]);
    }
    const deadline = Date.now() + 30_000;
    let row = await t.knex('sheet_jobs').where({ id: stale.id }).first();
    while (row.state !== 'finished' && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 100));
      row = await t.knex('sheet_jobs').where({ id: stale.id }).first();
    }
    expect(row).toMatchObject({ state: 'finished', done: 1 });
    expect(row.archive_file_id).toBeTruthy();
  });

  it('answers 404 for an unknown batch or job, and 409 for a batch without units', async () => {
    const tester = await signedInAgent(t.app, DEMO.tester);
    await tester.post('/api/batches/987654/spec-sheets').set('X-CSRF-Token', tester.csrf).expect(404);
    await tester.get('/api/spec-sheet-jobs/987654').expect(404);
    const model = await t.knex('models').where({ sku: 'HM-SMD' }).first('active_revision_id');
    const { rows } = await t.knex.raw("SELECT nextval('batch_number_seq')::int AS n");
    const [empty] = await t.knex('batches').insert({ number: rows[0].n, revision_id: model.active_revision_id }).returning('id');
    const res = await tester.post(`/api/batches/${empty.id}/spec-sheets`).set('X-CSRF-Token', tester.csrf).expect(409);
    expect(res.body.error.message).toMatch(/no units/);
  });
});
