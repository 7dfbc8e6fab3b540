import { beforeAll, describe, expect, it } from 'vitest';
import type { TestAgent } from '../support/app';
import { makeCatalog, makePaidOrder } from './production-fixture';
import { readyJuno, useProductionApp } from './production-setup';

// The batch page's draft editing and the bench tablet's rules: reopening a step with a reason,
// confirming a step finished far under its standard time, late builds, and opening a unit by serial.
const { t, crew } = useProductionApp(['planner', 'juno', 'priya', 'tester']);
let junoId: number;
beforeAll(async () => {
  junoId = await readyJuno(t.knex, crew.planner);
});

const post = (agent: TestAgent, url: string, body: object = {}) => agent.post(url).set('X-CSRF-Token', agent.csrf).send(body);

async function draftBatch() {
  const c = await makeCatalog(t.knex);
  const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, 1);
  const { body } = await post(crew.planner, '/api/batches', { revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
  return { c, order, batchId: body.id as number };
}

/** A released, kitted one-unit batch assigned to Juno on `date`. */
async function junoUnit(date = '2027-01-05', dueAt?: string) {
  const c = await makeCatalog(t.knex);
  const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, 1, dueAt);
  const { body } = await post(crew.planner, '/api/batches', { revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
  await post(crew.planner, `/api/batches/${body.id}/release`).expect(200);
  await post(crew.planner, `/api/batches/${body.id}/kit`).expect(200);
  const unit = await t.knex('units').where({ batch_id: body.id }).first();
  await post(crew.planner, `/api/batches/${body.id}/assignments`, { builds: [{ unitId: unit.id, assemblerId: junoId, date }] }).expect(200);
  return { c, unit };
}

/** Pretends a step was started `minutes` ago. */
const startedMinutesAgo = (unitId: number, stepId: number, minutes: number) =>
  t.knex('unit_steps').where({ unit_id: unitId, step_id: stepId }).update({ started_at: t.knex.raw(`now() - interval '${Number(minutes)} minutes'`) });

describe('a batch being planned stays editable until release', () => {
  it('adds and removes order lines and stock builds, and lists the customers release will mail', async () => {
    const { c, batchId } = await draftBatch();
    const second = await makePaidOrder(t.knex, c.modelId, c.options.asym, 2);
    const added = await post(crew.planner, `/api/batches/${batchId}/lines`, { orderLineIds: [second.lineId], stockBuilds: [{ optionId: c.options.asym, quantity: 3 }] }).expect(201);
    expect(added.body).toMatchObject({ added: 2, units: 5 });
    let detail = (await crew.planner.get(`/api/batches/${batchId}`).expect(200)).body;
    expect(detail.lines.map((l: { quantity: number }) => l.quantity)).toEqual([1, 2, 3]);
    expect(detail.customersToMail.map((m: { orderNumber: string }) => m.orderNumber)).toContain(second.number);
    expect(detail.customersToMail).toHaveLength(2);

    const stockLine = detail.lines.find((l: { orderNumber: string | null }) => l.orderNumber === null);
    await crew.planner.delete(`/api/batches/${batchId}/lines/${stockLine.id}`).set('X-CSRF-Token', crew.planner.csrf).expect(200);
    const secondLine = detail.lines.find((l: { orderNumber: string | null }) => l.orderNumber === second.number);
    await crew.planner.delete(`/api/batches/${batchId}/lines/${secondLine.id}`).set('X-CSRF-Token', crew.planner.csrf).expect(200);
    detail = (await crew.planner.get(`/api/batches/${batchId}`).expect(200)).body;
    expect(detail.lines).toHaveLength(1);
    expect(detail.customersToMail).toHaveLength(1);
    // The removed order line is free for planning again.
    const candidates = (await crew.planner.get(`/api/batches/candidates?modelId=${c.modelId}`).expect(200)).body;
    expect(candidates.orderLines.items.map((l: { id: number }) => l.id)).toContain(second.lineId);
  });

  it('refuses a line already in a batch, the last line, a line of another batch and another model’s option', async () => {
    const { c, order, batchId } = await draftBatch();
    const again = await post(crew.planner, `/api/batches/${batchId}/lines`, { orderLineIds: [order.lineId] });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already in this batch/);
    const other = await draftBatch();
    const foreign = await post(crew.planner, `/api/batches/${batchId}/lines`, { stockBuilds: [{ optionId: other.c.options.asym, quantity: 1 }] });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.stockBuilds).toBeTruthy();
    const empty = await post(crew.planner, `/api/batches/${batchId}/lines`, {});
    expect(empty.status).toBe(400);
    const [line] = (await crew.planner.get(`/api/batches/${batchId}`).expect(200)).body.lines;
    const last = await crew.planner.delete(`/api/batches/${batchId}/lines/${line.id}`).set('X-CSRF-Token', crew.planner.csrf);
    expect(last.status).toBe(409);
    expect(last.body.error.message).toMatch(/last line/);
    const [otherLine] = (await crew.planner.get(`/api/batches/${other.batchId}`).expect(200)).body.lines;
    await crew.planner.delete(`/api/batches/${batchId}/lines/${otherLine.id}`).set('X-CSRF-Token', crew.planner.csrf).expect(404);
    void c;
  });

  it('answers 409 once the batch is released or cancelled, and changes nothing', async () => {
    const { c, batchId } = await draftBatch();
    await post(crew.planner, `/api/batches/${batchId}/lines`, { stockBuilds: [{ optionId: c.options.asym, quantity: 1 }] }).expect(201);
    await post(crew.planner, `/api/batches/${batchId}/release`).expect(200);
    const lines = (await crew.planner.get(`/api/batches/${batchId}`).expect(200)).body.lines;
    const add = await post(crew.planner, `/api/batches/${batchId}/lines`, { stockBuilds: [{ optionId: c.options.asym, quantity: 1 }] });
    expect(add.status).toBe(409);
    expect(add.body.error.message).toMatch(/only a batch being planned/);
    const remove = await crew.planner.delete(`/api/batches/${batchId}/lines/${lines[0].id}`).set('X-CSRF-Token', crew.planner.csrf);
    expect(remove.status).toBe(409);
    expect(Number((await t.knex('batch_lines').where({ batch_id: batchId }).count({ n: '*' }).first())?.n)).toBe(2);
    expect((await crew.planner.get(`/api/batches/${batchId}`).expect(200)).body.customersToMail).toEqual([]);

    const cancelled = await draftBatch();
    await post(crew.planner, `/api/batches/${cancelled.batchId}/cancel`, { reason: 'not this week' }).expect(200);
    expect((await post(crew.planner, `/api/batches/${cancelled.batchId}/lines`, { stockBuilds: [{ optionId: cancelled.c.options.asym, quantity: 1 }] })).status).toBe(409);
  });

  it('takes a line added while planning into the release', async () => {
    const { c, batchId } = await draftBatch();
    await post(crew.planner, `/api/batches/${batchId}/lines`, { stockBuilds: [{ optionId: c.options.asym, quantity: 2 }] }).expect(201);
    const released = await post(crew.planner, `/api/batches/${batchId}/release`).expect(200);
    expect(released.body.units).toBe(3);
    expect(Number((await t.knex('units').where({ batch_id: batchId }).count({ n: '*' }).first())?.n)).toBe(3);
  });
});

describe('the bench tablet’s step rules', () => {
  it('asks for confirmation when a step is finished far under its standard time, and records it', async () => {
    const { c, unit } = await junoUnit();
    const [populate] = c.steps; // standard 60 min
    await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/start`).expect(200);
    const fast = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`);
    expect(fast.status).toBe(409);
    expect(fast.body.error.code).toBe('fast_step');
    expect(fast.body.error.message).toMatch(/under 25 % of its standard 60 min/);
    expect((await t.knex('unit_steps').where({ unit_id: unit.id, step_id: populate }).first()).finished_at).toBeNull();
    const confirmed = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`, { confirmFast: true }).expect(200);
    expect(confirmed.body.confirmedFast).toBe(true);
    const events = await t.knex('unit_events').where({ unit_id: unit.id, kind: 'step' }).pluck('message');
    expect(events.some((m: string) => /confirmed as finished although far under the standard time/.test(m))).toBe(true);
  });

  it('does not ask when the step took at least the threshold share of its standard time', async () => {
    const { c, unit } = await junoUnit();
    const [populate] = c.steps; // 60 min: 25 % is 15 min
    await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/start`).expect(200);
    await startedMinutesAgo(unit.id, populate, 16);
    const res = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`).expect(200);
    expect(res.body.confirmedFast).toBe(false);
    expect(res.body.actualMinutes).toBeCloseTo(16, 0);
  });

  it('follows the threshold in the shop’s settings', async () => {
    const before = (await t.knex('settings').where({ id: 1 }).first()).fast_step_percent;
    try {
      await t.knex('settings').where({ id: 1 }).update({ fast_step_percent: 50 });
      const { c, unit } = await junoUnit();
      const [populate] = c.steps;
      await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/start`).expect(200);
      await startedMinutesAgo(unit.id, populate, 20); // a third of 60 min: fast at 50 %, not at the default 25 %
      const res = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`);
      expect(res.status).toBe(409);
      expect(res.body.error.message).toMatch(/took 20 min, under 50 % of its standard 60 min/);
      expect((await crew.juno.get(`/api/units/${unit.id}`).expect(200)).body.fastStepPercent).toBe(50);
      // 0 % turns the question off.
      await t.knex('settings').where({ id: 1 }).update({ fast_step_percent: 0 });
      await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`).expect(200);
    } finally {
      await t.knex('settings').where({ id: 1 }).update({ fast_step_percent: before });
    }
  });

  it('reopens a finished step with a reason, in the history, and times it again', async () => {
    const { c, unit } = await junoUnit();
    const [populate, match] = c.steps;
    await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/start`).expect(200);
    await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`, { confirmFast: true }).expect(200);
    const noReason = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/reopen`, { reason: ' ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/Say why/);
    expect((await post(crew.juno, `/api/units/${unit.id}/steps/${match}/reopen`, { reason: 'not started' })).status).toBe(409);
    expect((await post(crew.priya, `/api/units/${unit.id}/steps/${populate}/reopen`, { reason: 'not mine' })).status).toBe(403);
    await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/reopen`, { reason: 'tapped Finish by mistake' }).expect(200);
    const row = await t.knex('unit_steps').where({ unit_id: unit.id, step_id: populate }).first();
    expect(row.finished_at).toBeNull();
    expect(row.actual_minutes).toBeNull();
    const detail = await crew.juno.get(`/api/units/${unit.id}`).expect(200);
    expect(detail.body.history.map((h: { message: string }) => h.message)).toContain('reopened “Populate the board”: tapped Finish by mistake');
    expect((await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/reopen`, { reason: 'twice' })).status).toBe(409);
    await startedMinutesAgo(unit.id, populate, 30);
    const again = await post(crew.juno, `/api/units/${unit.id}/steps/${populate}/finish`).expect(200);
    expect(again.body.actualMinutes).toBeCloseTo(30, 0);
  });

  it('refuses to reopen a step once the unit has gone to the test bench', async () => {
    const { c, unit } = await junoUnit();
    for (const step of c.steps) {
      await post(crew.juno, `/api/units/${unit.id}/steps/${step}/start`).expect(200);
      await post(crew.juno, `/api/units/${unit.id}/steps/${step}/finish`, { confirmFast: true }).expect(200);
    }
    const detail = await crew.juno.get(`/api/units/${unit.id}`).expect(200);
    const readings = detail.body.devices.map((d: { optionDeviceId: number; nominalVf: number }) => ({ optionDeviceId: d.optionDeviceId, vf: Number(d.nominalVf.toFixed(3)) }));
    await crew.juno.put(`/api/units/${unit.id}/devices`).set('X-CSRF-Token', crew.juno.csrf).send({ readings }).expect(200);
    await crew.juno.put(`/api/units/${unit.id}/lots`).set('X-CSRF-Token', crew.juno.csrf).send({ lots: [{ bomLineId: c.pcbLine, lot: 'PCB-LOT-9' }] }).expect(200);
    await post(crew.juno, `/api/units/${unit.id}/built`).expect(200);
    const res = await post(crew.juno, `/api/units/${unit.id}/steps/${c.steps[0]}/reopen`, { reason: 'forgot a joint' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/not open for building/);
  });
});

describe('late builds and serials', () => {
  it('flags a build whose planned day or due date has passed, and not one still ahead', async () => {
    const late = await junoUnit('2024-03-04');
    const overdue = await junoUnit('2099-01-05', '2024-02-01T12:00:00Z');
    const ahead = await junoUnit('2099-01-05', '2099-02-01T12:00:00Z');
    const builds = (await crew.juno.get('/api/builds?pageSize=100').expect(200)).body.items as { id: number; late: string | null }[];
    const byId = new Map(builds.map((b) => [b.id, b.late]));
    expect(byId.get(late.unit.id)).toBe('planned for 2024-03-04');
    expect(byId.get(overdue.unit.id)).toBe('order was due 2024-02-01');
    expect(byId.get(ahead.unit.id)).toBeNull();
    expect((await crew.juno.get(`/api/units/${late.unit.id}`).expect(200)).body.unit.late).toBe('planned for 2024-03-04');
  });

  it('opens a unit by its serial, in any letter case; an assembler only their own', async () => {
    const { unit } = await junoUnit();
    const found = await crew.tester.get(`/api/serials/${unit.serial.toLowerCase()}`).expect(200);
    expect(found.body).toEqual({ id: unit.id, serial: unit.serial, state: 'waiting' });
    expect((await crew.juno.get(`/api/serials/${unit.serial}`).expect(200)).body.id).toBe(unit.id);
    expect((await crew.priya.get(`/api/serials/${unit.serial}`)).status).toBe(403);
    const missing = await crew.tester.get('/api/serials/ZZ-NO-SUCH-1');
    expect(missing.status).toBe(404);
    expect(missing.body.error.message).toBe('No unit has the serial ZZ-NO-SUCH-1');
    expect((await crew.tester.get('/api/serials/a%20b')).status).toBe(404);
  });
});
