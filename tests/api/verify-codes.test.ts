// The public unit check cannot be walked serial by serial: new units need their code, and one
// address gets few answers however it dresses its requests.
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { unitSerial } from '../../shared/production/serials';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { listen } from '../support/browser';
import { freshLoopback, LoopbackClient } from '../support/net';
import { fetchBinary, insertBatch, userId } from './spec-sheets-setup';

// The shipped defaults for this page (30 a minute, 60 misses a day), not the test suite's raised ones.
const t = startTestApp({ VERIFY_MAX_PER_MINUTE: '30', VERIFY_MAX_MISSES_PER_DAY: '60' });
let server: Awaited<ReturnType<typeof listen>>;
let batch: Awaited<ReturnType<typeof insertBatch>>;
const codeOf = async (id: number) => (await t.knex('units').where({ id }).first('verify_code')).verify_code as string | null;

beforeAll(async () => {
  server = await listen(t.app);
  batch = await insertBatch(t.knex, [{ vf: [1.79, 0.6], state: 'passed' }, { vf: [1.8, 0.61] }, { vf: [1.81, 0.6] }]);
  await t.knex('test_records').insert({ unit_id: batch.units[0].id, tester_id: await userId(t.knex, DEMO.tester), current_draw_ma: 7, measured_thd_percent: 9, predicted_thd_percent: 9, tolerance_percent: 15, within_tolerance: true, outcome: 'pass' });
  // A unit made before codes existed: its printed sheet carries the serial alone.
  await t.knex('units').where({ id: batch.units[2].id }).update({ verify_code: null });
});
afterAll(async () => { await server.close(); await t.stop(); });

describe('unit codes', () => {
  it('are random per new unit, required for it, and answered like an unknown serial when wrong or missing', async () => {
    const [a, b] = [await codeOf(batch.units[0].id), await codeOf(batch.units[1].id)];
    expect(a).toMatch(/^[0-9a-f]{20}$/);
    expect(b).toMatch(/^[0-9a-f]{20}$/);
    expect(a).not.toBe(b);
    const c = new LoopbackClient(server.url, freshLoopback());
    const serial = batch.units[0].serial;
    expect((await c.get(`/verify/${serial}?c=${a}`)).status).toBe(200);
    const missing = await c.get(`/verify/${serial}`);
    const wrong = await c.get(`/verify/${serial}?c=${b}`);
    const unknown = await c.get('/verify/HM-B9999-999X');
    expect([missing.status, wrong.status, unknown.status]).toEqual([404, 404, 404]);
    expect(missing.text.replace(serial, 'S')).toBe(unknown.text.replace('HM-B9999-999X', 'S'));
    expect(wrong.text).toBe(missing.text);
  });

  it('leave a unit made before codes valid by its serial alone', async () => {
    const c = new LoopbackClient(server.url, freshLoopback());
    expect((await c.get(`/verify/${batch.units[2].serial}`)).status).toBe(200);
  });

  it('are in the verification link printed on the spec sheet', async () => {
    const tester = await signedInAgent(t.app, DEMO.tester);
    const { body } = await fetchBinary(tester, `/api/units/${batch.units[0].serial}/spec-sheet.pdf`);
    const text = (await new PDFParse({ data: new Uint8Array(body) }).getText()).text;
    expect(text).toContain(`/verify/${batch.units[0].serial}?c=${await codeOf(batch.units[0].id)}`);
  });
});

describe('guessing serials', () => {
  it('gets at most 30 answers from 300 guesses by one address, even with a new X-Forwarded-For on each', async () => {
    const c = new LoopbackClient(server.url, freshLoopback());
    const counts: Record<number, number> = {};
    // Real-looking serials (check letters computed as the public code does), around a real batch.
    for (let i = 0; i < 300; i++) {
      const serial = unitSerial('HM', 1 + (i % 12), 1 + Math.floor(i / 12));
      const res = await c.get(`/verify/${serial}`, { 'x-forwarded-for': `203.0.113.${i % 250}` });
      counts[res.status] = (counts[res.status] ?? 0) + 1;
    }
    expect(counts[429]).toBeGreaterThanOrEqual(270);
    expect((counts[200] ?? 0) + (counts[404] ?? 0)).toBeLessThanOrEqual(30);
  });

  it('count misses for a day, so waiting out the minute does not reset a guesser', async () => {
    const c = new LoopbackClient(server.url, freshLoopback());
    const newMinute = () => t.knex('rate_limits').where({ key: `verify:${c.from}` }).delete();
    for (let i = 0; i < 60; i++) {
      if (i % 25 === 0) await newMinute();
      expect((await c.get(`/verify/HM-B9998-${String(i).padStart(3, '0')}X`)).status).toBe(404);
    }
    await newMinute();
    expect((await c.get('/verify/HM-B9998-061X')).status).toBe(429);
    const misses = await t.knex('rate_limits').where({ key: `verify-miss:${c.from}` }).first();
    expect(new Date(misses.reset_at).getTime() - Date.now()).toBeGreaterThan(23 * 3600_000);
  });
});
