import { afterAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { available, makeCatalog, makePaidOrder } from './production-fixture';

const t = startTestApp();
afterAll(() => t.stop());

describe('batch planning and release', () => {
  it('explodes the BOM: base × units plus each option’s delta × its units', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const c = await makeCatalog(t.knex);
    const order = await makePaidOrder(t.knex, c.modelId, c.options.sym, 2);
    // The waiting lines come a page at a time, here for this test's own model only.
    const candidates = await planner.get(`/api/batches/candidates?modelId=${c.modelId}`).expect(200);
    expect(candidates.body.orderLines.items.map((l: { id: number }) => l.id)).toContain(order.lineId);
    expect(candidates.body.orderLines.items.every((l: { modelId: number }) => l.modelId === c.modelId)).toBe(true);
    expect(candidates.body.orderLines).toMatchObject({ total: 1, page: 1 });
    expect(candidates.body.revisions.some((r: { id: number }) => r.id === c.revisionId)).toBe(true);
    const created = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
      .send({ revisionId: c.revisionId, orderLineIds: [order.lineId], stockBuilds: [{ optionId: c.options.asym, quantity: 1 }] }).expect(201);
    const batch = await planner.get(`/api/batches/${created.body.id}`).expect(200);
    const row = (id: number) => batch.body.requirements.find((r: { partId: number }) => r.partId === id);
    expect(row(c.parts.pcb)).toMatchObject({ baseQuantity: 3, optionQuantity: 0, required: 3, shortage: 0 });
    // Silicon pair: 2 diodes × 2 units; silicon-vs-LED: 1 diode + 1 LED × 1 unit.
    expect(row(c.parts.diode)).toMatchObject({ baseQuantity: 0, optionQuantity: 5, required: 5 });
    expect(row(c.parts.led)).toMatchObject({ required: 1 });
    expect(batch.body.batch.state).toBe('draft');
    // A pulled line is no longer offered to another batch.
    const again = await planner.get(`/api/batches/candidates?modelId=${c.modelId}`).expect(200);
    expect(again.body.orderLines.items.map((l: { id: number }) => l.id)).not.toContain(order.lineId);
    expect(again.body.orderLines.total).toBe(0);
    const twice = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [order.lineId] });
    expect(twice.status).toBe(409);
  });

  it('rejects bad planning input with field messages', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const empty = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: 'x' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.fields.revisionId).toBeTruthy();
    const c = await makeCatalog(t.knex);
    const none = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: c.revisionId });
    expect(none.status).toBe(400);
    expect(none.body.error.fields.orderLineIds).toMatch(/at least one/i);
  });

  it('refuses release with shortages unless a reason is given, lists what to buy and when building can start', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const c = await makeCatalog(t.knex, { stock: 1 });
    const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
      .send({ revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.sym, quantity: 3 }] }).expect(201);
    // The server reads its own clock: take the date just before and just after the request, so a run
    // across midnight accepts either day instead of failing.
    const fourteenDaysFrom = (ms: number) => new Date(ms + 14 * 86_400_000).toISOString().slice(0, 10);
    const before = fourteenDaysFrom(Date.now());
    const batch = await planner.get(`/api/batches/${body.id}`).expect(200);
    const after = fourteenDaysFrom(Date.now());
    const pcb = batch.body.requirements.find((r: { partId: number }) => r.partId === c.parts.pcb);
    expect(pcb.shortage).toBe(2);
    // The op-amp (14 days) is short too and has the longest lead time.
    expect([before, after]).toContain(batch.body.earliestStart.date);
    const csv = await planner.get(`/api/batches/${body.id}/purchase-list.csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.text.split('\n')[0]).toBe('supplier,part_number,description,quantity,lead_time_days,unit_cost,line_cost');
    expect(csv.text).toContain(`Test Supplies ${c.tag},PCB-${c.tag},PCB,2,10,0.25,0.50`);

    const refused = await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({});
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/short/);
    const released = await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({ overrideReason: 'boards arrive Thursday' }).expect(200);
    expect(released.body.units).toBe(3);
    const row = await t.knex('batches').where({ id: body.id }).first();
    expect(row.shortage_override_reason).toBe('boards arrive Thursday');
    expect(row.shortages_at_release.map((s: { partNumber: string }) => s.partNumber)).toContain(`PCB-${c.tag}`);
  });

  it('releases: freezes the revision, numbers units without gaps, schedules the order and queues its mail; a second release is a 409', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const c = await makeCatalog(t.knex);
    const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, 2);
    const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf)
      .send({ revisionId: c.revisionId, orderLineIds: [order.lineId], stockBuilds: [{ optionId: c.options.sym, quantity: 2 }] }).expect(201);
    await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({ startDate: '2027-01-04' }).expect(200);
    const units = await t.knex('units').where({ batch_id: body.id }).orderBy('sequence');
    expect(units.map((u) => u.sequence)).toEqual([1, 2, 3, 4]);
    expect(new Set(units.map((u) => u.serial)).size).toBe(4);
    expect(units[0].serial).toMatch(/^HM-B\d{4}-001[A-Z]$/);
    expect(units.filter((u) => u.order_id === order.orderId)).toHaveLength(2);
    expect((await t.knex('model_revisions').where({ id: c.revisionId }).first()).frozen_at).not.toBeNull();
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('scheduled');
    expect((await t.knex('order_lines').where({ id: order.lineId }).first()).batch_id).toBe(body.id);
    const mail = await t.knex('outbox').where({ dedupe_key: `order-scheduled:${order.orderId}:${body.id}` }).first();
    expect(mail.template).toBe('order-scheduled');
    expect(mail.to_address).toBe('customer@shop.example');
    expect(mail.data.estimatedShipDate).toMatch(/^2027-01-\d{2}$/);
    expect(mail.data.serials).toHaveLength(2);
    const history = await t.knex('unit_events').where({ unit_id: units[0].id });
    expect(history[0]).toMatchObject({ to_state: 'waiting' });
    const again = await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/released to the bench/i);
  });

  it('cancels a released batch before kitting: units cancelled, reservation released, order back to paid', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const c = await makeCatalog(t.knex);
    const order = await makePaidOrder(t.knex, c.modelId, c.options.sym, 1);
    const { body } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
    await planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    await planner.post(`/api/batches/${body.id}/reserve`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    expect(await available(t.knex, c.parts.pcb)).toBe(49);
    const noReason = await planner.post(`/api/batches/${body.id}/cancel`).set('X-CSRF-Token', planner.csrf).send({});
    expect(noReason.status).toBe(400);
    await planner.post(`/api/batches/${body.id}/cancel`).set('X-CSRF-Token', planner.csrf).send({ reason: 'customer changed option' }).expect(200);
    expect(await available(t.knex, c.parts.pcb)).toBe(50);
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('paid');
    expect((await t.knex('units').where({ batch_id: body.id })).every((u) => u.state === 'cancelled')).toBe(true);
    const twice = await planner.post(`/api/batches/${body.id}/cancel`).set('X-CSRF-Token', planner.csrf).send({ reason: 'again' });
    expect(twice.status).toBe(409);
    // The order line can go into a new batch now.
    await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
  });
});
