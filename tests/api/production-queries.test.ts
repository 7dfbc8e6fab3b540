import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { makeCatalog } from './production-fixture';

// The board and the batch page cost a fixed number of queries, however many live batches or
// units there are (no query per batch or per unit). Counted with knex's 'query' event.
const t = startTestApp();
afterAll(() => t.stop());

let planner: TestAgent;
let queries = 0;
beforeAll(async () => {
  planner = await signedInAgent(t.app, DEMO.planner);
  t.knex.on('query', () => { queries += 1; });
});

async function countQueries(path: string) {
  const before = queries;
  const res = await planner.get(path).expect(200);
  return { count: queries - before, body: res.body };
}

async function releasedBatch(units: number) {
  const c = await makeCatalog(t.knex, { stock: 100 });
  const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
    .send({ revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.sym, quantity: units - 1 }, { optionId: c.options.asym, quantity: 1 }] }).expect(201);
  await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
  return body.id as number;
}

describe('set-based production reads', () => {
  it('GET /api/board costs the same number of queries with three more live batches', async () => {
    await releasedBatch(2);
    const first = await countQueries('/api/board');
    for (let i = 0; i < 3; i++) await releasedBatch(2);
    const second = await countQueries('/api/board');
    expect(second.body.batches.length).toBeGreaterThanOrEqual(first.body.batches.length + 3);
    expect(second.count).toBe(first.count);
    console.log(`[queries] GET /api/board: ${second.count} queries for ${second.body.batches.length} live batches`);
  }, 60_000);

  it('GET /api/batches/:id costs the same number of queries for 3 and for 30 units', async () => {
    const small = await countQueries(`/api/batches/${await releasedBatch(3)}`);
    const large = await countQueries(`/api/batches/${await releasedBatch(30)}`);
    expect(large.body.units).toHaveLength(30);
    expect(large.count).toBe(small.count);
    console.log(`[queries] GET /api/batches/:id: ${large.count} queries for 30 units`);
  }, 60_000);

  it('a live batch’s shortages on the board match its own batch page', async () => {
    const c = await makeCatalog(t.knex, { stock: 2 });
    const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
      .send({ revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.sym, quantity: 4 }] }).expect(201);
    await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({ overrideReason: 'short on purpose' }).expect(200);
    const detail = (await planner.get(`/api/batches/${body.id}`).expect(200)).body;
    const board = (await planner.get('/api/board').expect(200)).body;
    const label = detail.batch.label;
    // 4 units need 4 PCBs and 4 op-amps against 2 of each in stock: 2 short each (worked by hand).
    const mine = board.shortages.filter((s: { batch: string }) => s.batch === label).map((s: { partNumber: string; shortage: number }) => [s.partNumber, s.shortage]);
    expect(mine).toEqual([[`OPAMP-${c.tag}`, 2], [`PCB-${c.tag}`, 2]]);
    expect(detail.requirements.filter((r: { shortage: number }) => r.shortage > 0).map((r: { partNumber: string; shortage: number }) => [r.partNumber, r.shortage])).toEqual(mine);
    expect(board.batches.find((b: { id: number }) => b.id === body.id).units).toEqual({ waiting: 4 });
  }, 60_000);
});
