// Trays of measured devices and matching a batch from them: entry, import, flags, the proposal
// (exact pairs, cross pairs, leftovers, gain) and accepting it into units.
import { describe, expect, it } from 'vitest';
import { forwardVoltage, findPreset } from '../../shared/engine';
import { matchPairs } from '../../shared/matching/pairs';
import type { TestAgent } from '../support/app';
import { makeCatalog, makePaidOrder } from './production-fixture';
import { useProductionApp } from './production-setup';

const { t, crew } = useProductionApp(['planner', 'juno', 'tester', 'customer']);

const deviceIds = async (c: Awaited<ReturnType<typeof makeCatalog>>) => {
  const rows = await t.knex('option_devices').where({ option_id: c.options.asym }).orderBy('side', 'desc').select('device_id');
  return { si: rows[0].device_id as number, led: rows[1].device_id as number };
};

async function newTray(agent: TestAgent, deviceId: number, readings: number[]) {
  const created = await agent.post('/api/trays').set('X-CSRF-Token', agent.csrf).send({ deviceId, supplierLot: 'L-2611-A', receivedOn: '2026-11-30' }).expect(201);
  const id = created.body.tray.id as number;
  const saved = await agent.put(`/api/trays/${id}/slots`).set('X-CSRF-Token', agent.csrf)
    .send({ readings: readings.map((vf, i) => ({ slot: i + 1, vf })) }).expect(200);
  return { id, body: saved.body };
}

// Silicon readings near the model's 0.585 V at 1 mA (invented lot, 0.1 mV meter steps).
const SILICON = [0.5912, 0.5897, 0.5934, 0.5921, 0.5899, 0.5950, 0.5905, 0.5928, 0.5941, 0.5916, 0.5889, 0.5931];

describe('trays', () => {
  it('takes readings slot by slot from an assembler and gives the tray’s distribution', async () => {
    const c = await makeCatalog(t.knex);
    const { si } = await deviceIds(c);
    const { body } = await newTray(crew.juno, si, [...SILICON, 0.6400, 0.8600]);
    expect(body.tray.code).toBe(`T${body.tray.id}`);
    expect(body.slots).toHaveLength(14);
    expect(body.slots[6].label).toBe(`T${body.tray.id}-07`);
    const all = [...SILICON, 0.64, 0.86];
    const mean = all.reduce((a, b) => a + b, 0) / all.length;
    expect(body.stats.meanV).toBeCloseTo(mean, 9);
    expect(body.stats.sigmaV).toBeCloseTo(Math.sqrt(all.reduce((a, v) => a + (v - mean) ** 2, 0) / (all.length - 1)), 9);
    expect(body.stats.histogram.reduce((a: number, b: { count: number }) => a + b.count, 0)).toBe(14);
    // 0.86 V is outside silicon's 0.5–0.8 V and far from the tray; 0.64 V is in range but far from the tray.
    expect(body.slots[13].flags).toEqual(['range', 'distribution']);
    expect(body.slots[12].flags).toEqual(['distribution']);
    expect(body.slots[0].flags).toEqual([]);
    // The lot's median (≈ 0.592 V) is near the model's nominal Vf at 1 mA: no substitution called out.
    const nominal = forwardVoltage(findPreset('si-small-signal')!.model, 1e-3);
    expect(body.stats.nominal.vf).toBeCloseTo(nominal, 9);
    expect(body.stats.nominal.shifted).toBe(false);
  });

  it('calls out a tray whose readings sit far from the device model (a substituted part)', async () => {
    const c = await makeCatalog(t.knex);
    const { si } = await deviceIds(c);
    // A lot reading ≈ 0.70 V: in silicon's range, but ≈ 110 mV above the model's nominal.
    const { body } = await newTray(crew.tester, si, SILICON.map((v) => v + 0.11));
    expect(body.stats.nominal.shifted).toBe(true);
    expect(body.slots.every((s: { flags: string[] }) => s.flags.length === 0)).toBe(true);
  });

  it('imports a meter CSV (all rows or none) and refuses oversize files', async () => {
    const c = await makeCatalog(t.knex);
    const { si } = await deviceIds(c);
    const { id } = await newTray(crew.juno, si, [0.59]);
    const csv = 'slot,Vf (mV)\r\n2,591.2\r\n3,589.7\r\n4,593.4\r\n';
    const ok = await crew.juno.post(`/api/trays/${id}/import`).set('X-CSRF-Token', crew.juno.csrf).attach('file', Buffer.from(csv), { filename: 'meter.csv', contentType: 'text/csv' }).expect(200);
    expect(ok.body.imported).toBe(3);
    expect(ok.body.slots.map((s: { vf: number }) => s.vf)).toEqual([0.59, 0.5912, 0.5897, 0.5934]);
    // One line without a reading: nothing is imported.
    const bad = await crew.juno.post(`/api/trays/${id}/import`).set('X-CSRF-Token', crew.juno.csrf).attach('file', Buffer.from('0.601\nabc\n0.602\n'), { filename: 'm.csv', contentType: 'text/csv' }).expect(400);
    expect(bad.body.error.fields.file).toMatch(/line 2/);
    expect((await crew.juno.get(`/api/trays/${id}`).expect(200)).body.slots).toHaveLength(4);
    const big = await crew.juno.post(`/api/trays/${id}/import`).set('X-CSRF-Token', crew.juno.csrf).attach('file', Buffer.alloc(300 * 1024, '0.600\n'), { filename: 'big.csv', contentType: 'text/csv' });
    expect(big.status).toBe(413);
  });

  it('answers 400, 404 and 403 in words', async () => {
    const c = await makeCatalog(t.knex);
    const { si } = await deviceIds(c);
    const noDevice = await crew.juno.post('/api/trays').set('X-CSRF-Token', crew.juno.csrf).send({ deviceId: 99999999, supplierLot: 'X', receivedOn: '2026-11-30' }).expect(400);
    expect(noDevice.body.error.fields.deviceId).toBeTruthy();
    const badDate = await crew.juno.post('/api/trays').set('X-CSRF-Token', crew.juno.csrf).send({ deviceId: si, supplierLot: 'X', receivedOn: '2026-02-31' }).expect(400);
    expect(badDate.body.error.fields.receivedOn).toBeTruthy();
    await crew.juno.get('/api/trays/99999999').expect(404);
    const { id } = await newTray(crew.juno, si, [0.59]);
    const twice = await crew.juno.put(`/api/trays/${id}/slots`).set('X-CSRF-Token', crew.juno.csrf).send({ readings: [{ slot: 2, vf: 0.6 }, { slot: 2, vf: 0.61 }] }).expect(400);
    expect(twice.body.error.fields['readings.1.slot']).toMatch(/twice/);
    await crew.juno.put(`/api/trays/${id}/slots`).set('X-CSRF-Token', crew.juno.csrf).send({ readings: [{ slot: 1, vf: -0.6 }] }).expect(400);
    await crew.customer.get('/api/trays').expect(403);
    const list = await crew.juno.get(`/api/trays?deviceId=${si}`).expect(200);
    expect(list.body.items.map((x: { id: number }) => x.id)).toContain(id);
  });
});

describe('matching a batch', () => {
  async function releasedBatch() {
    const c = await makeCatalog(t.knex);
    const symOrder = await makePaidOrder(t.knex, c.modelId, c.options.sym, 3);
    const asymOrder = await makePaidOrder(t.knex, c.modelId, c.options.asym, 2);
    const { body } = await crew.planner.post('/api/batches').set('X-CSRF-Token', crew.planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [symOrder.lineId, asymOrder.lineId] }).expect(201);
    return { c, batchId: body.id as number, ...(await deviceIds(c)) };
  }

  /** A released batch, a silicon and an LED tray, and the planner's proposal from them with its accept body. */
  async function proposedMatch() {
    const { batchId, si, led } = await releasedBatch();
    await crew.planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    const siTray = await newTray(crew.juno, si, SILICON);
    const ledTray = await newTray(crew.juno, led, [1.652, 1.671, 1.638, 1.660]);
    const { body: proposal } = await crew.planner.post(`/api/batches/${batchId}/matching/proposal`).set('X-CSRF-Token', crew.planner.csrf).send({ trayIds: [siTray.id, ledTray.id] }).expect(200);
    const accept = { units: proposal.units.map((u: { unitId: number; slots: { optionDeviceId: number; slotId: number }[] }) => ({ unitId: u.unitId, slots: u.slots.map((x) => ({ optionDeviceId: x.optionDeviceId, slotId: x.slotId })) })) };
    return { batchId, siTray, ledTray, proposal, accept };
  }

  it('is refused before release, then proposes exact pairs, cross pairs and lists leftovers', async () => {
    const { c, batchId, si, led } = await releasedBatch();
    await crew.planner.post(`/api/batches/${batchId}/matching/proposal`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(409);
    await crew.planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    const siTray = await newTray(crew.juno, si, SILICON);
    // Red LEDs near the model's 1.65 V at 1 mA (invented lot).
    const ledTray = await newTray(crew.juno, led, [1.652, 1.671, 1.638, 1.660]);
    await crew.juno.post(`/api/batches/${batchId}/matching/proposal`).set('X-CSRF-Token', crew.juno.csrf).send({}).expect(403);
    const { body } = await crew.planner.post(`/api/batches/${batchId}/matching/proposal`).set('X-CSRF-Token', crew.planner.csrf)
      .send({ trayIds: [siTray.id, ledTray.id] }).expect(200);

    const sym = body.options.find((o: { optionId: number }) => o.optionId === c.options.sym);
    const asym = body.options.find((o: { optionId: number }) => o.optionId === c.options.asym);
    expect(sym.method).toBe('pairs');
    expect(asym.method).toBe('cross');
    // Options take from the trays in unit order (the symmetric units come first here), so the
    // symmetric pairs are exactly what the checking contract's function gives for the whole tray.
    const symUnits = body.units.filter((u: { optionCode: string }) => u.optionCode === 'SI2');
    expect(symUnits).toHaveLength(3);
    const expected = matchPairs({ readings: siTray.body.slots.map((s: { id: number; vf: number }) => ({ id: String(s.id), vf: s.vf })), pairs: 3, objective: 'sum' });
    expect(symUnits.map((u: { slots: { slotId: number }[] }) => u.slots.map((s) => String(s.slotId)).sort()).sort())
      .toEqual(expected.pairs.map((p) => [p.a, p.b].sort()).sort());
    expect(symUnits.reduce((a: number, u: { mismatchMv: number }) => a + u.mismatchMv, 0)).toBeCloseTo(expected.totalDeltaMv, 3);
    // Two cross units, each one silicon (positive) and one LED (negative).
    const asymUnits = body.units.filter((u: { optionCode: string }) => u.optionCode === 'SIL');
    expect(asymUnits).toHaveLength(2);
    for (const u of asymUnits) expect(u.slots.map((s: { side: string; deviceName: string }) => s.side)).toEqual(['positive', 'negative']);
    // 12 silicon − 6 − 2 = 4 left, 4 LEDs − 2 = 2 left.
    expect(body.leftovers).toHaveLength(6);
    expect(body.unmatched).toEqual([]);
    // The gain: matched symmetric pairs have far less H2 than random pairs of the same lot.
    expect(sym.matchedH2.meanDbc).toBeLessThan(sym.randomH2.meanDbc);
    expect(asym.matchedH2.meanOffDb).toBeLessThanOrEqual(asym.randomH2.meanOffDb + 1e-9);
  });

  it('accepting fills each unit’s Vf from its slots, names the slots, and takes them off the tray', async () => {
    const { batchId, siTray, proposal, accept } = await proposedMatch();

    // A slot given twice, and a silicon slot in the LED's position, are field errors.
    const first = accept.units[0];
    await crew.planner.post(`/api/batches/${batchId}/matching`).set('X-CSRF-Token', crew.planner.csrf)
      .send({ units: [first, { ...accept.units[1], slots: [first.slots[0], accept.units[1].slots[1]] }] }).expect(400);
    const cross = proposal.units.find((u: { optionCode: string }) => u.optionCode === 'SIL');
    const wrong = await crew.planner.post(`/api/batches/${batchId}/matching`).set('X-CSRF-Token', crew.planner.csrf)
      .send({ units: [{ unitId: cross.unitId, slots: [{ optionDeviceId: cross.slots[1].optionDeviceId, slotId: cross.slots[0].slotId }, { optionDeviceId: cross.slots[0].optionDeviceId, slotId: cross.slots[1].slotId }] }] }).expect(400);
    expect(Object.values(wrong.body.error.fields).join()).toMatch(/holds another device/);

    const ok = await crew.planner.post(`/api/batches/${batchId}/matching`).set('X-CSRF-Token', crew.planner.csrf).send(accept).expect(200);
    expect(ok.body.matched).toBe(5);
    // Again: the units already have their devices.
    await crew.planner.post(`/api/batches/${batchId}/matching`).set('X-CSRF-Token', crew.planner.csrf).send(accept).expect(409);

    const batch = await crew.planner.get(`/api/batches/${batchId}`).expect(200);
    const planned = proposal.units[0];
    const row = batch.body.units.find((u: { id: number }) => u.id === planned.unitId);
    expect(row.slots).toEqual(planned.slots.map((s: { label: string }) => s.label));
    expect(row.slots[0]).toMatch(/^T\d+-\d{2}$/);

    const unit = await crew.planner.get(`/api/units/${planned.unitId}`).expect(200);
    for (const s of planned.slots) {
      const d = unit.body.devices.find((x: { optionDeviceId: number }) => x.optionDeviceId === s.optionDeviceId);
      expect(d.measuredVf).toBe(s.vf);
      expect(d.slot).toEqual({ label: s.label, vf: s.vf });
    }
    expect(unit.body.unit.predicted.fromMeasuredVf).toBe(true);
    expect(unit.body.history.some((h: { message: string }) => h.message.includes(planned.slots[0].label))).toBe(true);

    // A matched slot cannot change on the tray; the tray shows where it went.
    const tray = await crew.juno.get(`/api/trays/${siTray.id}`).expect(200);
    const taken = tray.body.slots.find((s: { id: number }) => s.id === planned.slots[0].slotId);
    expect(taken.unit.id).toBe(planned.unitId);
    const change = await crew.juno.put(`/api/trays/${siTray.id}/slots`).set('X-CSRF-Token', crew.juno.csrf).send({ readings: [{ slot: taken.slot, vf: 0.6 }] }).expect(409);
    expect(change.body.error.message).toContain(taken.label);
    // Nothing left to match in this batch.
    const again = await crew.planner.post(`/api/batches/${batchId}/matching/proposal`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    expect(again.body.units).toEqual([]);
  });
  it('puts a cancelled unit’s matched devices back on their trays, and a cancelled batch’s too', async () => {
    const { batchId, siTray, ledTray, proposal, accept } = await proposedMatch();
    await crew.planner.post(`/api/batches/${batchId}/matching`).set('X-CSRF-Token', crew.planner.csrf).send(accept).expect(200);
    const taken = async () => (await t.knex('tray_slots').whereIn('tray_id', [siTray.id, ledTray.id]).whereNotNull('unit_id').pluck('id')).sort();

    const [first, ...rest] = proposal.units as { unitId: number; slots: { slotId: number }[] }[];
    await crew.planner.post(`/api/units/${first.unitId}/cancel`).set('X-CSRF-Token', crew.planner.csrf).send({ reason: 'customer changed the option' }).expect(200);
    expect(await taken()).toEqual(rest.flatMap((u) => u.slots.map((x) => x.slotId)).sort());
    // The freed slots can be read again, and matched to another unit.
    await crew.juno.put(`/api/trays/${siTray.id}/slots`).set('X-CSRF-Token', crew.juno.csrf)
      .send({ readings: [{ slot: (await t.knex('tray_slots').where({ id: first.slots[0].slotId }).first('slot')).slot, vf: 0.5913 }] }).expect(200);

    await crew.planner.post(`/api/batches/${batchId}/cancel`).set('X-CSRF-Token', crew.planner.csrf).send({ reason: 'model withdrawn' }).expect(200);
    expect(await taken()).toEqual([]);
  });
});
