import { afterAll, describe, expect, it } from 'vitest';
import { DEVICE_PRESETS, computeProfile, runContract } from '../../shared/engine/index';
import { anonymousAgent, DEMO, signedInAgent, startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());

describe('catalog demo scenario (seeds/02-catalog.ts)', () => {
  it('has ~60 parts with stock history, one device per engine preset, three models with two revisions', async () => {
    const parts = await t.knex('parts').count<{ count: number }[]>('* as count');
    expect(parts[0].count).toBeGreaterThanOrEqual(55);
    const low = await t.knex('parts as p').join('part_stock as s', 's.part_id', 'p.id').whereRaw('s.available < p.reorder_point').count<{ count: number }[]>('* as count');
    expect(low[0].count).toBeGreaterThan(0);
    const kinds = await t.knex('stock_movements').distinct('kind').pluck('kind');
    // Other areas' seeds may add reserve/consume movements of their own.
    expect(kinds).toEqual(expect.arrayContaining(['adjust', 'consume', 'receive']));
    const devices = await t.knex('devices').whereNotNull('preset_key').pluck('preset_key');
    expect(devices.sort()).toEqual(DEVICE_PRESETS.map((p) => p.id).sort());
    const models = await t.knex('models').whereIn('sku', ['HM-SMD', 'HM-LFO', 'HM-CPD']).select('id', 'active_revision_id');
    expect(models).toHaveLength(3);
    for (const m of models) {
      // Other test files may start revision 3 on a demo model; the seed made 1 and 2.
      const revs = await t.knex('model_revisions').where({ model_id: m.id }).where('number', '<=', 2).orderBy('number');
      expect(revs.map((r) => r.number)).toEqual([1, 2]);
      expect(m.active_revision_id).toBe(revs[1].id);
      expect(revs[0].frozen_at).not.toBeNull();
      for (const r of revs) {
        const lines = await t.knex('bom_lines').where({ revision_id: r.id }).count<{ count: number }[]>('* as count');
        expect(lines[0].count).toBeGreaterThanOrEqual(40);
        expect(lines[0].count).toBeLessThanOrEqual(80);
        const steps = await t.knex('build_steps').where({ revision_id: r.id });
        expect(steps.length).toBeGreaterThanOrEqual(6);
        expect(steps.length).toBeLessThanOrEqual(10);
        for (const s of steps) if (s.soldering) expect(s.safety_note).toMatch(/Soldering/);
      }
      const options = await t.knex('clipping_options').where({ model_id: m.id });
      expect(options.length).toBeGreaterThanOrEqual(3);
      expect(options.length).toBeLessThanOrEqual(5);
    }
  });

  it('asks assemblers for the lots of ICs, diodes and clipping-device parts, and of nothing else', async () => {
    const { active_revision_id: revisionId } = await t.knex('models').where({ sku: 'HM-CPD' }).first('active_revision_id');
    const lines = await t.knex('bom_lines as b').join('parts as p', 'p.id', 'b.part_id').where('b.revision_id', revisionId)
      .select('b.designators', 'b.needs_lot', 'p.category', 'p.part_number');
    const traced = lines.filter((l) => l.needs_lot).map((l) => l.designators).sort();
    // The board's op-amp and regulator, the guard diode, and the status LED (a red LED, stocked as a clipping device).
    expect(traced).toEqual(['D1', 'IC1', 'LED1', 'U2']);
    expect(lines.filter((l) => ['resistor', 'capacitor', 'hardware', 'pot'].includes(l.category)).every((l) => !l.needs_lot)).toBe(true);
  });
});

describe('GET /api/models', () => {
  it('shows visitors published models and options only, without costs', async () => {
    const anon = await anonymousAgent(t.app);
    const res = await anon.get('/api/models').expect(200);
    const smd = res.body.models.find((m: { sku: string }) => m.sku === 'HM-SMD');
    // Other test files may publish extra options on this model; the seeded unpublished one stays hidden.
    const codes = smd.options.map((o: { code: string }) => o.code);
    expect(codes.slice(0, 3)).toEqual(['SI2', 'LED2', 'ASYM']);
    expect(codes).not.toContain('GE2');
    expect(smd.basePriceCents).toBe(18900);
    const photo = await anon.get(smd.photoUrl).expect(200);
    expect(photo.headers['content-type']).toBe('image/png');
    expect(photo.body.subarray(1, 4).toString()).toBe('PNG');
    const text = JSON.stringify(res.body);
    for (const secret of ['cost', 'Cents":0,"flags', 'published', 'available', 'supplier', 'partId']) expect(text).not.toContain(secret);
  });

  it('shows staff every option and the cost roll-up (parts + labour at the settings rate)', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const res = await planner.get('/api/models').expect(200);
    const smd = res.body.models.find((m: { sku: string }) => m.sku === 'HM-SMD');
    expect(smd.options.map((o: { code: string }) => o.code)).toContain('GE2');
    const lfo = res.body.models.find((m: { sku: string }) => m.sku === 'HM-LFO');
    const flagged = lfo.options.filter((o: { flags: string[] }) => o.flags.length > 0);
    expect(flagged.map((o: { code: string; flags: string[] }) => [o.code, o.flags])).toEqual([['WHT2', ['LED, white has no linked part']]]);
    const minutes = await t.knex('build_steps').where({ revision_id: smd.activeRevision.id }).sum<{ sum: number }[]>('standard_minutes as sum');
    const parts = await t.knex('bom_lines as b').join('parts as p', 'p.id', 'b.part_id').where('b.revision_id', smd.activeRevision.id).sum<{ sum: number }[]>({ sum: t.knex.raw('b.quantity * p.unit_cost_cents') });
    expect(smd.cost.labourMinutes).toBe(Number(minutes[0].sum));
    expect(smd.cost.partsCents).toBe(Number(parts[0].sum));
    expect(smd.cost.labourCents).toBe(Math.round((Number(minutes[0].sum) * 3200) / 60));
  });
});

describe('GET /api/models/:id', () => {
  it('gives the drive stage, device strings with Vf and an engine input per option that the engine accepts', async () => {
    const customer = await signedInAgent(t.app, DEMO.customer);
    const { id } = await t.knex('models').where({ sku: 'HM-SMD' }).first('id');
    const res = await customer.get(`/api/models/${id}`).expect(200);
    const m = res.body.model;
    expect(m.activeRevision.drive).toEqual({ minGain: 1, maxGain: 150, taper: 'audio', inputPeakV: 0.1, supplyV: 9, referenceDrive: 0.5 });
    const si2 = m.options.find((o: { code: string }) => o.code === 'SI2');
    // 1N4148-type at 1 mA ≈ 0.585 V (engine's documented figure); at 10 mA higher.
    expect(si2.positive[0].vfAt1mA).toBeCloseTo(0.585, 2);
    expect(si2.positive[0].vfAt10mA).toBeGreaterThan(si2.positive[0].vfAt1mA);
    expect(si2.positive[0].partId).toBeUndefined();
    expect(si2.engineInput.contract.railPeakV).toBe(3);
    expect(si2.engineInput.contract.driveGain).toBeCloseTo(1 + 149 * 0.1, 9);
    const out = runContract(si2.engineInput.contract);
    expect(out.thdF).toBeGreaterThan(0.01);
    const profile = computeProfile(si2.engineInput.circuit, { sweepPoints: 5 });
    expect(profile.reference.spectrum.thdF).toBeCloseTo(out.thdF, 6);
    expect(m.options.some((o: { code: string }) => o.code === 'GE2')).toBe(false);
    expect(JSON.stringify(m)).not.toMatch(/cost|bomDelta|flags/i);
  });

  it('is 404 for a visitor asking for an unpublished model, and for a path id that cannot name a model', async () => {
    const [{ id }] = await t.knex('models').insert({ name: `Hidden ${Date.now()}`, sku: `HID-${Date.now()}`, base_price_cents: 100, published: false }).returning('id');
    const anon = await anonymousAgent(t.app);
    await anon.get(`/api/models/${id}`).expect(404);
    // A malformed path id names nothing: the same 404 as a missing row (server/http/params.ts).
    for (const bad of ['abc', '0', '-1', '1e308', '2147483648', '12abc']) await anon.get(`/api/models/${bad}`).expect(404);
    const owner = await signedInAgent(t.app, DEMO.owner);
    const res = await owner.get(`/api/models/${id}`).expect(200);
    expect(res.body.model.activeRevision).toBeNull();
    await anon.get(`/api/models/${id}/photo`).expect(404);
  });
});
