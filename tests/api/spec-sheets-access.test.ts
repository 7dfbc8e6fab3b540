import express from 'express';
import request from 'supertest';
import { listen } from '../support/browser';
import { freshLoopback, LoopbackClient } from '../support/net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorMiddleware } from '../../server/errors';
import { buildRouter } from '../../server/http/route-table';
import { specSheetRoutes } from '../../server/routes/spec-sheets';
import { anonymousAgent, DEMO, signedInAgent, startTestApp } from '../support/app';
import { fetchBinary, insertBatch, insertOrder, userId } from './spec-sheets-setup';

const t = startTestApp();
afterAll(() => t.stop());

let batch: Awaited<ReturnType<typeof insertBatch>>;
let orderNumber: string;
let orderId: number;

beforeAll(async () => {
  const customer = await userId(t.knex, DEMO.customer);
  const option = await t.knex('clipping_options as c').join('models as m', 'm.id', 'c.model_id').where({ 'm.sku': 'HM-SMD', 'c.code': 'ASYM' }).first('c.id');
  const order = await insertOrder(t.knex, customer, option.id, 2);
  orderId = order.orderId;
  orderNumber = (await t.knex('orders').where({ id: order.orderId }).first('number')).number;
  batch = await insertBatch(t.knex, [{ vf: [1.79, 0.60], state: 'passed' }, { vf: [1.81, 0.61] }], { orderId: order.orderId, orderLineId: order.orderLineId });
  await t.knex('test_records').insert({ unit_id: batch.units[0].id, tester_id: await userId(t.knex, DEMO.tester), current_draw_ma: 7.1, measured_thd_percent: 9.1, predicted_thd_percent: 9.0, tolerance_percent: 15, within_tolerance: true, outcome: 'pass' });
});

describe('who may download a unit’s spec sheet', () => {
  it('lets the customer whose order it is download it once passed, and says when it is not ready', async () => {
    const customer = await signedInAgent(t.app, DEMO.customer);
    const { body } = await fetchBinary(customer, `/api/units/${batch.units[0].serial}/spec-sheet.pdf`);
    expect(body.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const early = await customer.get(`/api/units/${batch.units[1].serial}/spec-sheet.pdf`).expect(409);
    expect(early.body.error.message).toMatch(/once the unit has passed/);
  });

  it('answers another customer 404, as if the unit did not exist', async () => {
    const other = await signedInAgent(t.app, 'sam@mail.example');
    const res = await other.get(`/api/units/${batch.units[0].serial}/spec-sheet.pdf`).expect(404);
    expect(res.body.error.code).toBe('not_found');
    expect(JSON.stringify(res.body)).not.toContain('Castellano');
  });

  it('lists the customer’s own order’s pedals with which sheets are ready, and nobody else’s', async () => {
    const customer = await signedInAgent(t.app, DEMO.customer);
    const res = await customer.get(`/api/orders/${orderId}/spec-sheets`).expect(200);
    expect(res.body.units).toEqual([
      { serial: batch.units[0].serial, state: 'passed', modelName: 'Saltmarsh Drive', optionName: batch.option.optionName, sheetReady: true },
      { serial: batch.units[1].serial, state: 'built', modelName: 'Saltmarsh Drive', optionName: batch.option.optionName, sheetReady: false },
    ]);
    const other = await signedInAgent(t.app, 'sam@mail.example');
    await other.get(`/api/orders/${orderId}/spec-sheets`).expect(404);
    const planner = await signedInAgent(t.app, DEMO.planner);
    expect((await planner.get(`/api/orders/${orderId}/spec-sheets`).expect(200)).body.units).toHaveLength(2);
  });

  it('lets any staff member read it, and signed-out visitors not at all', async () => {
    const assembler = await signedInAgent(t.app, DEMO.assembler);
    await fetchBinary(assembler, `/api/units/${batch.units[1].serial}/spec-sheet.pdf`);
    const anon = await anonymousAgent(t.app);
    await anon.get(`/api/units/${batch.units[0].serial}/spec-sheet.pdf`).expect(401);
    const tester = await signedInAgent(t.app, DEMO.tester);
    await tester.get('/api/units/HM-B9999-999X/spec-sheet.pdf').expect(404);
    // A path that cannot be a serial names no unit: the same 404 as an unknown serial (server/http/params.ts).
    const bad = await tester.get('/api/units/not%20a%20serial/spec-sheet.pdf').expect(404);
    expect(bad.body.error.message).toBe('No such unit');
  });
});

/** The link a unit's spec sheet prints: serial plus the unit's own check code. */
async function verifyPath(unit: { id: number; serial: string }) {
  const { verify_code: code } = await t.knex('units').where({ id: unit.id }).first('verify_code');
  return `/verify/${unit.serial}?c=${code}`;
}

describe('the public verification page', () => {
  it('confirms a real unit with model, option, build month and verdict, and nothing personal', async () => {
    const res = await request(t.app).get(await verifyPath(batch.units[0])).expect(200);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text).toContain(batch.units[0].serial);
    expect(res.text).toContain('Saltmarsh Drive');
    expect(res.text).toContain(batch.option.optionName);
    expect(res.text).toContain('November 2026');
    expect(res.text).toContain('Passed its bench test');
    for (const personal of ['Castellano', 'customer@shop.example', 'Abara', 'Vennig', 'Teststraße', orderNumber]) expect(res.text).not.toContain(personal);
  });

  it('says a unit still being made is not yet tested', async () => {
    const res = await request(t.app).get(await verifyPath(batch.units[1])).expect(200);
    expect(res.text).toContain('Built, bench test still to come');
  });

  it('answers an unknown serial with a plain not-found page and 404', async () => {
    const res = await request(t.app).get('/verify/HM-B9999-999X').expect(404);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text).toContain('Serial not found');
    const odd = await request(t.app).get('/verify/%3Cscript%3E').expect(404);
    expect(odd.text).not.toContain('<script>');
  });

  it('is rate-limited per address', async () => {
    // The same routes with a limit of 3 a minute, so the test needs only a few requests; the client
    // talks from a loopback address of its own, so no other test shares the count.
    const app = express();
    const routes = specSheetRoutes(t.knex, { ...t.config, VERIFY_MAX_PER_MINUTE: 3 }).filter((r) => r.path === '/verify/:serial');
    app.use(buildRouter(routes, { routes: [] }));
    app.use(errorMiddleware);
    const server = await listen(app);
    try {
      const client = new LoopbackClient(server.url, freshLoopback());
      for (let i = 0; i < 3; i++) expect((await client.get('/verify/HM-B9999-999X')).status).toBe(404);
      const limited = await client.get('/verify/HM-B9999-999X');
      expect(limited.status).toBe(429);
      expect(limited.text).toContain('Too many checks');
      await t.knex('rate_limits').where('key', 'like', `verify%${client.from}%`).delete();
    } finally {
      await server.close();
    }
  });
});
