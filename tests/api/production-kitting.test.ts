import { afterAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { appendMovements } from '../../server/services/stock/ledger';
import { available, makeCatalog } from './production-fixture';

const t = startTestApp();
afterAll(() => t.stop());

async function releasedStockBatch(revisionId: number, optionId: number, quantity: number) {
  const planner = await signedInAgent(t.app, DEMO.planner);
  const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId, stockBuilds: [{ optionId, quantity }] }).expect(201);
  await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({ overrideReason: 'test of short stock' }).expect(200);
  return { planner, batchId: body.id as number };
}

describe('kitting through the stock ledger', () => {
  it('reserves partially when short, consumes per unit, and releases a cancelled unit’s share', async () => {
    const c = await makeCatalog(t.knex, { stock: 3 });
    const { planner, batchId } = await releasedStockBatch(c.revisionId, c.options.sym, 5);
    const reserve = await planner.post(`/api/batches/${batchId}/reserve`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    expect(reserve.body.stillShort).toBe(4); // 2 PCBs and 2 op-amps
    expect(await available(t.knex, c.parts.pcb)).toBe(0);
    const kit = await planner.post(`/api/batches/${batchId}/kit`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    expect(kit.body).toMatchObject({ kitted: 3, notKitted: 2 });
    expect(kit.body.firstProblem).toMatch(/short of PCB/);
    const stock = await t.knex('part_stock').where({ part_id: c.parts.pcb }).first();
    expect(stock).toMatchObject({ on_hand: 0, reserved: 0, available: 0 });
    // Diodes: 3 kitted units × 2 consumed; the 2 unkitted units keep 4 reserved.
    expect(await t.knex('part_stock').where({ part_id: c.parts.diode }).first()).toMatchObject({ on_hand: 194, reserved: 4, available: 190 });
    const unkitted = await t.knex('units').where({ batch_id: batchId }).whereNull('kitted_at').orderBy('sequence');
    await planner.post(`/api/units/${unkitted[0].id}/cancel`).set('X-CSRF-Token', planner.csrf).send({ reason: 'board damaged in rework' }).expect(200);
    expect(await t.knex('part_stock').where({ part_id: c.parts.diode }).first()).toMatchObject({ reserved: 2, available: 192 });
    const again = await planner.post(`/api/units/${unkitted[0].id}/cancel`).set('X-CSRF-Token', planner.csrf).send({ reason: 'twice' });
    expect(again.status).toBe(409);
  });

  it('two batches kitting in parallel against one part never drive available stock negative', async () => {
    const c = await makeCatalog(t.knex, { stock: 10 });
    const a = await releasedStockBatch(c.revisionId, c.options.sym, 8);
    const b = await releasedStockBatch(c.revisionId, c.options.asym, 8);
    const [ra, rb] = await Promise.all([
      a.planner.post(`/api/batches/${a.batchId}/reserve`).set('X-CSRF-Token', a.planner.csrf).send({}),
      b.planner.post(`/api/batches/${b.batchId}/reserve`).set('X-CSRF-Token', b.planner.csrf).send({}),
    ]);
    expect([ra.status, rb.status]).toEqual([200, 200]);
    expect(await available(t.knex, c.parts.pcb)).toBe(0);
    const reserved = await t.knex('stock_movements').where({ part_id: c.parts.pcb, kind: 'reserve' }).sum({ q: 'quantity' }).first();
    expect(Number(reserved?.q)).toBe(10);
    const [ka, kb] = await Promise.all([
      a.planner.post(`/api/batches/${a.batchId}/kit`).set('X-CSRF-Token', a.planner.csrf).send({}),
      b.planner.post(`/api/batches/${b.batchId}/kit`).set('X-CSRF-Token', b.planner.csrf).send({}),
    ]);
    expect(ka.body.kitted + kb.body.kitted).toBe(10);
    const pcb = await t.knex('part_stock').where({ part_id: c.parts.pcb }).first();
    expect(pcb).toMatchObject({ on_hand: 0, reserved: 0, available: 0 });
    // And every partial sum of the ledger in order stays non-negative.
    const movements = await t.knex('stock_movements').where({ part_id: c.parts.pcb }).orderBy('id');
    let onHand = 0;
    let held = 0;
    for (const m of movements) {
      onHand += m.on_hand_delta;
      held += m.reserved_delta;
      expect(onHand - held).toBeGreaterThanOrEqual(0);
    }
  });

  it('a reservation that waited for a part plans with the stock left after the wait, not with what it saw before', async () => {
    const c = await makeCatalog(t.knex, { stock: 10 });
    const a = await releasedStockBatch(c.revisionId, c.options.sym, 8);
    const b = await releasedStockBatch(c.revisionId, c.options.asym, 8);
    // Another transaction holds the board part and takes 8 of its 10 while the request waits.
    const trx = await t.knex.transaction();
    await trx('parts').where({ id: c.parts.pcb }).forNoKeyUpdate().select('id');
    const pending = b.planner.post(`/api/batches/${b.batchId}/reserve`).set('X-CSRF-Token', b.planner.csrf).send({}).then((r) => r);
    const waiting = async () => (await t.knex('pg_stat_activity').where({ wait_event_type: 'Lock' }).whereILike('query', '%"parts"%').count({ n: '*' }).first())?.n;
    for (let i = 0; i < 200 && Number(await waiting()) === 0; i++) await new Promise((r) => setTimeout(r, 25));
    expect(Number(await waiting())).toBe(1);
    await appendMovements(trx, [{ partId: c.parts.pcb, kind: 'reserve', quantity: 8, batchId: a.batchId, reason: 'held elsewhere' }]);
    await trx.commit();
    const res = await pending;
    expect(res.status).toBe(200);
    // The 2 left are reserved; the other 6 boards are short, and nothing went below zero.
    expect(res.body.stillShort).toBeGreaterThanOrEqual(6);
    expect(await available(t.knex, c.parts.pcb)).toBe(0);
  });
});
