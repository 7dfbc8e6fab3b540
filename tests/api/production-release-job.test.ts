import { afterAll, describe, expect, it } from 'vitest';
import { startJobs } from '../../server/jobs/boss';
import { releaseJob } from '../../server/jobs/releases';
import { releaseStep } from '../../server/services/production/release';
import { runPendingReleases } from '../../server/services/production/release-job';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { makeCatalog, makePaidOrder } from './production-fixture';

// Big releases: a batch above one chunk (RELEASE_CHUNK_UNITS) is accepted with 202 and made by the
// release job, chunk by chunk, while the same process keeps answering requests.
const CHUNK = 100;
const t = startTestApp({ RELEASE_CHUNK_UNITS: String(CHUNK) });
afterAll(() => t.stop());

async function bigBatch(planner: TestAgent, stock: { optionId: number; quantity: number }[], orderLineIds: number[] = []) {
  const c = await makeCatalog(t.knex, { stock: 10 });
  const created = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
    .send({ revisionId: c.revisionId, orderLineIds, stockBuilds: stock.map((s) => ({ ...s, optionId: s.optionId || c.options.sym })) });
  return { c, created };
}

describe('a 2,000-unit release', () => {
  it('runs as a job with progress on the batch, while /api/health keeps answering, and ends like a small release', { timeout: 240_000 }, async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const c = await makeCatalog(t.knex, { stock: 10 });
    const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, 5);
    const quantities = [500, 500, 500, 495];
    const created = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({
      revisionId: c.revisionId, orderLineIds: [order.lineId],
      stockBuilds: quantities.map((quantity, i) => ({ optionId: i % 2 ? c.options.asym : c.options.sym, quantity })),
    }).expect(201);
    const batchId = created.body.id as number;

    const accepted = await planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', planner.csrf)
      .send({ startDate: '2027-02-01', overrideReason: 'stock arrives next week' }).expect(202);
    expect(accepted.body).toMatchObject({ state: 'releasing', units: 2000, done: 0, orders: 1 });
    // While releasing: the revision is frozen, the batch refuses a second release and a cancel.
    expect((await t.knex('model_revisions').where({ id: c.revisionId }).first()).frozen_at).not.toBeNull();
    expect((await planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', planner.csrf).send({})).status).toBe(409);
    expect((await planner.post(`/api/batches/${batchId}/cancel`).set('X-CSRF-Token', planner.csrf).send({ reason: 'changed my mind' })).status).toBe(409);

    const jobs = await startJobs(t.config, [releaseJob(t.knex, t.config, 0.5)]);
    try {
      const seen: { state: string; done: number }[] = [];
      let healthWhileReleasing = 0;
      for (let i = 0; i < 1200; i++) {
        const detail = await planner.get(`/api/batches/${batchId}`).expect(200);
        seen.push({ state: detail.body.batch.state, done: detail.body.release.done });
        if (detail.body.batch.state === 'released') break;
        // The job runs in this very process: the event loop still answers between its chunks.
        const health = await planner.get('/api/health');
        expect(health.status).toBe(200);
        healthWhileReleasing += 1;
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
      expect(seen.at(-1)).toEqual({ state: 'released', done: 2000 });
      expect(healthWhileReleasing).toBeGreaterThan(0);
      // Progress only grows, and only by whole chunks (each chunk is one transaction).
      const dones = seen.map((s) => s.done);
      expect(dones).toEqual([...dones].sort((a, b) => a - b));
      for (const d of dones) expect(d % CHUNK === 0 || d === 2000).toBe(true);
    } finally {
      await jobs.stop();
    }

    const sequences: number[] = await t.knex('units').where({ batch_id: batchId }).orderBy('sequence').pluck('sequence');
    expect(sequences).toEqual(Array.from({ length: 2000 }, (_, i) => i + 1));
    const events = await t.knex('unit_events as e').join('units as u', 'u.id', 'e.unit_id').where('u.batch_id', batchId).count({ n: '*' }).first();
    expect(Number(events?.n)).toBe(2000);
    // The order's line was the first line: its 5 units are serials 1–5, mailed with the ship date.
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('scheduled');
    const mail = await t.knex('outbox').where({ dedupe_key: `order-scheduled:${order.orderId}:${batchId}` }).first();
    expect(mail.data.serials).toHaveLength(5);
    expect(mail.data.estimatedShipDate).toMatch(/^2027-\d{2}-\d{2}$/);
    const batch = await t.knex('batches').where({ id: batchId }).first();
    expect(batch).toMatchObject({ state: 'released', release_total: 2000, release_done: 2000, release_error: null });
  });
});

describe('the release job', () => {
  it('resumes from the units already made, and two workers at once make each unit once', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const { created } = await bigBatch(planner, [{ optionId: 0, quantity: 450 }]);
    const batchId = created.body.id as number;
    await planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', planner.csrf).send({ overrideReason: 'test of resume' }).expect(202);
    // One chunk, then the worker "dies": the batch stays releasing with 100 units.
    expect(await releaseStep(t.knex, batchId, CHUNK)).toBe(true);
    expect(await t.knex('batches').where({ id: batchId }).first('state', 'release_done')).toEqual({ state: 'releasing', release_done: 100 });
    await Promise.all([runPendingReleases(t.knex, CHUNK), runPendingReleases(t.knex, CHUNK)]);
    const sequences: number[] = await t.knex('units').where({ batch_id: batchId }).orderBy('sequence').pluck('sequence');
    expect(sequences).toEqual(Array.from({ length: 450 }, (_, i) => i + 1));
    expect(await t.knex('batches').where({ id: batchId }).first('state', 'release_done', 'release_error')).toEqual({ state: 'released', release_done: 450, release_error: null });
  });

  it('releases a batch of at most one chunk in the request, as before (200 with the units made)', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const { created } = await bigBatch(planner, [{ optionId: 0, quantity: CHUNK }]);
    const res = await planner.post(`/api/batches/${created.body.id}/release`).set('X-CSRF-Token', planner.csrf).send({ overrideReason: 'one chunk' }).expect(200);
    expect(res.body).toMatchObject({ state: 'released', units: CHUNK, done: CHUNK });
    const detail = await planner.get(`/api/batches/${created.body.id}`).expect(200);
    expect(detail.body.release).toEqual({ total: CHUNK, done: CHUNK, error: null });
  });
});
