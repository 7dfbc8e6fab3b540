import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { makeCatalog } from './production-fixture';

// Each planner action raced against kitting the same batch, over real HTTP on the real database:
// nobody gets a 5xx (the loser may get a 409), and after every trial the ledger, the balances, the
// units and the batch agree. Before the ledger's single lock order, kitting (unit → parts → batch)
// against these actions (batch → parts/units) deadlocked in most trials.
const t = startTestApp();
afterAll(() => t.stop());

const TRIALS = Number(process.env.KP_RACE_TRIALS ?? 10); // more with KP_RACE_TRIALS=20
const UNITS = 5;
let planner: TestAgent;
let assemblerId: number;

beforeAll(async () => {
  planner = await signedInAgent(t.app, DEMO.planner);
  assemblerId = (await t.knex('users').where({ email: DEMO.assembler }).first('id')).id;
});

const post = (path: string, body: object = {}) => planner.post(path).set('X-CSRF-Token', planner.csrf).send(body);

/** A released stock batch on a catalog of its own, optionally with its stock already reserved. */
async function trialBatch(reserve: boolean) {
  const c = await makeCatalog(t.knex, { stock: 40 });
  const { body } = await post('/api/batches', { revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.sym, quantity: UNITS }] }).expect(201);
  await post(`/api/batches/${body.id}/release`, {}).expect(200);
  if (reserve) await post(`/api/batches/${body.id}/reserve`).expect(200);
  const units: { id: number }[] = await t.knex('units').where({ batch_id: body.id }).orderBy('sequence').select('id');
  return { c, batchId: body.id as number, unitIds: units.map((u) => u.id) };
}

/** The ledger, the balances, the units and the batch agree; returns what happened for the tally. */
async function assertConsistent(c: Awaited<ReturnType<typeof makeCatalog>>, batchId: number) {
  const partIds = Object.values(c.parts);
  const stock = await t.knex('part_stock').whereIn('part_id', partIds);
  const sums = (await t.knex('stock_movements').whereIn('part_id', partIds).select('part_id').sum({ on_hand: 'on_hand_delta', reserved: 'reserved_delta' }).groupBy('part_id')) as unknown as { part_id: number; on_hand: string; reserved: string }[];
  for (const s of stock) {
    const ledger = sums.find((x) => x.part_id === s.part_id);
    expect({ on_hand: s.on_hand, reserved: s.reserved }).toEqual({ on_hand: Number(ledger?.on_hand ?? 0), reserved: Number(ledger?.reserved ?? 0) });
    expect(s.reserved).toBeGreaterThanOrEqual(0);
    expect(s.available).toBeGreaterThanOrEqual(0);
  }
  const batch = await t.knex('batches').where({ id: batchId }).first();
  const units = await t.knex('units').where({ batch_id: batchId });
  // Nothing half-kitted: a kitted unit consumed every BOM part once (PCB, op-amp, two diodes), an unkitted one nothing.
  const consumed = (await t.knex('stock_movements').where({ batch_id: batchId, kind: 'consume' }).select('unit_id').count({ n: '*' }).sum({ q: 'quantity' }).groupBy('unit_id')) as unknown as { unit_id: number; n: string; q: string }[];
  for (const u of units) {
    const row = consumed.find((x) => x.unit_id === u.id);
    if (u.kitted_at) expect([Number(row?.n), Number(row?.q)]).toEqual([3, 4]);
    else expect(row).toBeUndefined();
  }
  // The batch's reservation never goes negative and never exceeds what its open, unkitted units need.
  const held = (await t.knex('stock_movements').where({ batch_id: batchId }).select('part_id').sum({ r: 'reserved_delta' }).groupBy('part_id')) as unknown as { part_id: number; r: string }[];
  const open = units.filter((u) => !u.kitted_at && u.state !== 'cancelled').length;
  for (const h of held) {
    const perUnit = h.part_id === c.parts.diode ? 2 : 1;
    expect(Number(h.r)).toBeGreaterThanOrEqual(0);
    expect(Number(h.r)).toBeLessThanOrEqual(open * perUnit);
  }
  if (batch.state === 'cancelled') {
    expect(units.every((u) => u.state === 'cancelled' && !u.kitted_at)).toBe(true);
    expect(held.every((h) => Number(h.r) === 0)).toBe(true);
  } else {
    expect(batch.state).toBe('released');
  }
  return { kitted: units.filter((u) => u.kitted_at).length, cancelled: batch.state === 'cancelled' };
}

type Action = (trial: Awaited<ReturnType<typeof trialBatch>>) => request.Test;

async function race(name: string, reserveFirst: boolean, action: Action) {
  const statuses: number[] = [];
  for (let i = 0; i < TRIALS; i++) {
    const trial = await trialBatch(reserveFirst);
    const [kit, other] = await Promise.all([post(`/api/batches/${trial.batchId}/kit`), action(trial)]);
    statuses.push(kit.status, other.status);
    expect(kit.status, `${name}, trial ${i}: kit answered ${kit.status} ${JSON.stringify(kit.body)}`).toBeLessThan(500);
    expect(other.status, `${name}, trial ${i}: answered ${other.status} ${JSON.stringify(other.body)}`).toBeLessThan(500);
    expect([200, 201, 409]).toContain(other.status);
    await assertConsistent(trial.c, trial.batchId);
  }
  const tally = (from: number) => statuses.filter((_, i) => i % 2 === from).reduce<Record<number, number>>((a, s) => ({ ...a, [s]: (a[s] ?? 0) + 1 }), {});
  console.log(`[race] ${name}: ${TRIALS} trials, kit ${JSON.stringify(tally(0))}, action ${JSON.stringify(tally(1))}`);
  expect(statuses.filter((s) => s >= 500)).toEqual([]);
}

describe('planner actions racing a kit of the same batch', () => {
  it('cancel batch', () => race('cancel batch', true, (x) => post(`/api/batches/${x.batchId}/cancel`, { reason: 'customer changed option' })), 120_000);

  it('cancel unit (first and last)', () => race('cancel unit', true, (x) => {
    const unitId = x.unitIds[x.batchId % 2 ? 0 : x.unitIds.length - 1];
    return post(`/api/units/${unitId}/cancel`, { reason: 'board damaged' });
  }), 120_000);

  it('reserve', () => race('reserve', false, (x) => post(`/api/batches/${x.batchId}/reserve`)), 120_000);

  it('assign builds', () => race('assign', true, (x) => post(`/api/batches/${x.batchId}/assignments`, {
    builds: x.unitIds.map((unitId, i) => ({ unitId, assemblerId, date: `2027-01-0${4 + (i % 4)}` })),
  })), 120_000);

  it('catalog movements on the same parts (a count correction and a manual release of the batch)', () => race('movement', true, (x) => (x.batchId % 2
    ? post(`/api/parts/${x.c.parts.pcb}/movements`, { kind: 'adjust', quantity: 3, reason: 'recount' })
    : post(`/api/parts/${x.c.parts.diode}/movements`, { kind: 'release', quantity: 1, reason: 'spare back to shelf', batchId: x.batchId }))), 120_000);
});
