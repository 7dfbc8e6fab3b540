import { afterAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { fitDevice } from '../../shared/engine/index';
import { SOLDERING_CAUTION } from '../../shared/catalog/cautions';
import { DEMO, signedInAgent, startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());
const stamp = `${process.pid}${Date.now() % 100000}`;
const fixture = (name: string) => path.join(import.meta.dirname, '..', 'fixtures', name);
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

async function newModel(agent: Agent, suffix: string) {
  const res = await agent.post('/api/models').set('X-CSRF-Token', agent.csrf).send({ name: `Test pedal ${stamp}${suffix}`, sku: `TP-${stamp}${suffix}`, basePriceCents: 15000, published: false });
  expect(res.status).toBe(201);
  return res.body.model as { id: number; activeRevision: { id: number; number: number } };
}

describe('models', () => {
  it('validates a new model and rejects a taken SKU by field', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const bad = await planner.post('/api/models').set('X-CSRF-Token', planner.csrf).send({ name: '', sku: 'lower case', basePriceCents: -5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toMatchObject({ name: 'Name the pedal', sku: 'Capital letters, digits and - only', basePriceCents: 'Base price cannot be negative' });
    const dup = await planner.post('/api/models').set('X-CSRF-Token', planner.csrf).send({ name: `Other ${stamp}`, sku: 'HM-SMD', basePriceCents: 1 });
    expect(dup.body.error.fields).toEqual({ sku: 'HM-SMD already exists' });
  });

  it('takes a photo (images only, 413 above the cap) and serves it to visitors once published', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const m = await newModel(planner, 'P');
    // A real 1×1 PNG: the type check reads the file's structure, not only its first eight bytes.
    const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==', 'base64');
    const notImage = await planner.put(`/api/models/${m.id}/photo`).set('X-CSRF-Token', planner.csrf).attach('photo', Buffer.from('<svg/>'), { filename: 'x.png', contentType: 'image/png' });
    expect(notImage.status).toBe(400);
    expect(notImage.body.error.fields.photo).toBe('Not a PNG, JPEG or WebP image');
    const big = await planner.put(`/api/models/${m.id}/photo`).set('X-CSRF-Token', planner.csrf).attach('photo', Buffer.concat([png, Buffer.alloc(2 * 1024 * 1024)]), { filename: 'big.png', contentType: 'image/png' });
    expect(big.status).toBe(413);
    const ok = await planner.put(`/api/models/${m.id}/photo`).set('X-CSRF-Token', planner.csrf).attach('photo', png, { filename: 'pedal.png', contentType: 'image/png' });
    expect(ok.status).toBe(200);
    const visitor = await signedInAgent(t.app, DEMO.customer);
    await visitor.get(`/api/models/${m.id}/photo`).expect(404);
    await planner.patch(`/api/models/${m.id}`).set('X-CSRF-Token', planner.csrf).send({ published: true }).expect(200);
    const photo = await visitor.get(`/api/models/${m.id}/photo`).expect(200);
    expect(photo.headers['content-type']).toBe('image/png');
    expect(Buffer.compare(photo.body, png)).toBe(0);
  });
});

describe('BOM CSV', () => {
  it('previews each row’s problem and writes nothing', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const m = await newModel(planner, 'C');
    const res = await planner.post(`/api/revisions/${m.activeRevision.id}/bom-csv/preview`).set('X-CSRF-Token', planner.csrf).attach('file', fixture('bom-problems.csv'));
    expect(res.status).toBe(200);
    const byRow = Object.fromEntries(res.body.rows.map((r: { row: number; problems: string[] }) => [r.row, r.problems]));
    expect(byRow).toEqual({
      2: [],
      3: ['Bad quantity "two": use a whole number from 1 to 10000'],
      4: ['Duplicate designator R1 (also on row 2)'],
      5: ['2 designators for quantity 3'],
      6: ['Part number is missing'],
      7: [],
    });
    expect(res.body).toMatchObject({ total: 6, bad: 4, ok: false });
    const unknown = await planner.post(`/api/revisions/${m.activeRevision.id}/bom-csv/preview`).set('X-CSRF-Token', planner.csrf).attach('file', fixture('bom-one-bad-row.csv'));
    expect(unknown.body.rows[2].problems).toEqual(['Unknown part number "R-NOPE-99"']);
    const imp = await planner.post(`/api/revisions/${m.activeRevision.id}/bom-csv/import`).set('X-CSRF-Token', planner.csrf).attach('file', fixture('bom-one-bad-row.csv'));
    expect(imp.status).toBe(400);
    expect(imp.body.error.fields).toEqual({ 'row 4': 'Unknown part number "R-NOPE-99"' });
    expect(await t.knex('bom_lines').where({ revision_id: m.activeRevision.id }).count<{ c: number }[]>('* as c').then((r) => Number(r[0].c))).toBe(0);
  });

  it('imports a good file all at once, replacing the BOM; rejects a missing column and an oversized file', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const m = await newModel(planner, 'G');
    const rev = m.activeRevision.id;
    const imp = await planner.post(`/api/revisions/${rev}/bom-csv/import`).set('X-CSRF-Token', planner.csrf).attach('file', fixture('bom-good.csv'));
    expect(imp.status).toBe(200);
    expect(imp.body.revision.lines.map((l: { partNumber: string; quantity: number; designators: string }) => [l.partNumber, l.quantity, l.designators])).toEqual([
      ['R-10K-MF', 2, 'R1 R2'], ['C-100N-FILM', 1, 'C1'], ['IC-TL072', 1, 'IC1'], ['HW-FEET', 1, ''],
    ]);
    const costs = await t.knex('parts').whereIn('part_number', ['R-10K-MF', 'C-100N-FILM', 'IC-TL072', 'HW-FEET']).select('part_number', 'unit_cost_cents');
    const c = Object.fromEntries(costs.map((p) => [p.part_number, p.unit_cost_cents]));
    expect(imp.body.revision.cost.partsCents).toBe(2 * c['R-10K-MF'] + c['C-100N-FILM'] + c['IC-TL072'] + c['HW-FEET']);
    const noCol = await planner.post(`/api/revisions/${rev}/bom-csv/preview`).set('X-CSRF-Token', planner.csrf).attach('file', Buffer.from('part number,qty\nR-1K-MF,1\n'), 'x.csv');
    expect(noCol.status).toBe(400);
    expect(noCol.body.error.fields.file).toBe('Missing column: "designators"');
    const huge = Buffer.from(`part number,quantity,designators\n${'R-1K-MF,1,R1\n'.repeat(30000)}`);
    const big = await planner.post(`/api/revisions/${rev}/bom-csv/preview`).set('X-CSRF-Token', planner.csrf).attach('file', huge, 'big.csv');
    expect(big.status).toBe(413);
  });
});

describe('revisions are copy-on-write', () => {
  it('refuses edits of a frozen revision with 409 and starts revision N+1 from it', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const smd = await t.knex('models').where({ sku: 'HM-SMD' }).first('id');
    const frozen = await t.knex('model_revisions').where({ model_id: smd.id, number: 1 }).first('id');
    const line = await t.knex('bom_lines').where({ revision_id: frozen.id }).first('id', 'part_id');
    const step = await t.knex('build_steps').where({ revision_id: frozen.id }).first('id');
    const tries = [
      planner.patch(`/api/revisions/${frozen.id}`).send({ maxGain: 90 }),
      planner.post(`/api/revisions/${frozen.id}/bom-lines`).send({ partId: line.part_id, quantity: 1, designators: 'R99' }),
      planner.patch(`/api/bom-lines/${line.id}`).send({ partId: line.part_id, quantity: 1, designators: '' }),
      planner.delete(`/api/bom-lines/${line.id}`),
      planner.post(`/api/revisions/${frozen.id}/bom-csv/import`).attach('file', fixture('bom-good.csv')),
      planner.post(`/api/revisions/${frozen.id}/steps`).send({ title: 'x', standardMinutes: 1, skill: 'enclosure' }),
      planner.patch(`/api/steps/${step.id}`).send({ title: 'x', standardMinutes: 1, skill: 'enclosure' }),
      planner.delete(`/api/steps/${step.id}`),
    ];
    for (const req of tries) {
      const res = await req.set('X-CSRF-Token', planner.csrf);
      expect(res.status).toBe(409);
      expect(res.body.error.message).toMatch(/Revision 1 is frozen.*Start revision 3/);
    }
    const copy = await planner.post(`/api/models/${smd.id}/revisions`).set('X-CSRF-Token', planner.csrf).send({ fromRevisionId: frozen.id });
    expect(copy.status).toBe(201);
    const rev = copy.body.revision;
    expect(rev).toMatchObject({ number: 3, frozen: false, active: false, copiedFromRevisionId: frozen.id });
    const original = await planner.get(`/api/revisions/${frozen.id}`).expect(200);
    expect(rev.lines.map((l: { partNumber: string; designators: string }) => `${l.partNumber} ${l.designators}`)).toEqual(original.body.revision.lines.map((l: { partNumber: string; designators: string }) => `${l.partNumber} ${l.designators}`));
    expect(rev.steps).toHaveLength(original.body.revision.steps.length);
    const edited = await planner.patch(`/api/revisions/${rev.id}`).set('X-CSRF-Token', planner.csrf).send({ maxGain: 90 });
    expect(edited.body.revision.drive.maxGain).toBe(90);
    const upside = await planner.patch(`/api/revisions/${rev.id}`).set('X-CSRF-Token', planner.csrf).send({ minGain: 200 });
    expect(upside.body.error.fields.maxGain).toMatch(/at least the minimum/);
    expect((await t.knex('model_revisions').where({ id: frozen.id }).first('drive_max_gain')).drive_max_gain).toBe(120);
  });

  it('checks BOM lines and gives soldering steps the caution', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const m = await newModel(planner, 'S');
    const rev = m.activeRevision.id;
    const part = await t.knex('parts').where({ part_number: 'R-1K-MF' }).first('id');
    const add = (body: object) => planner.post(`/api/revisions/${rev}/bom-lines`).set('X-CSRF-Token', planner.csrf).send(body);
    expect((await add({ partId: part.id, quantity: 2, designators: 'R1 R2' })).status).toBe(201);
    expect((await add({ partId: part.id, quantity: 2, designators: 'R3' })).body.error.fields.designators).toBe('1 designators for quantity 2');
    expect((await add({ partId: part.id, quantity: 1, designators: 'r2' })).body.error.fields.designators).toBe('R2 is already on another line');
    expect((await add({ partId: part.id, quantity: 0 })).body.error.fields.quantity).toBe('At least 1');
    const step = await planner.post(`/api/revisions/${rev}/steps`).set('X-CSRF-Token', planner.csrf).send({ title: 'Solder the jacks', standardMinutes: 12, skill: 'through-hole', soldering: true, safetyNote: '' });
    expect(step.status).toBe(201);
    expect(step.body.revision.steps[0].safetyNote).toBe(SOLDERING_CAUTION);
    expect(step.body.revision.cost.labourMinutes).toBe(12);
    const badStep = await planner.post(`/api/revisions/${rev}/steps`).set('X-CSRF-Token', planner.csrf).send({ title: '', standardMinutes: 0, skill: 'juggling' });
    expect(badStep.body.error.fields).toMatchObject({ title: 'Give the step a title', standardMinutes: 'At least 1 minute', skill: 'Choose the skill' });
  });
});

describe('clipping options and devices', () => {
  it('creates an option from library devices; its BOM delta and cost come from the linked parts', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const smd = await t.knex('models').where({ sku: 'HM-SMD' }).first('id');
    const [si, white] = await Promise.all(['si-small-signal', 'led-white'].map((k) => t.knex('devices').where({ preset_key: k }).first('id')));
    const bad = await planner.post(`/api/models/${smd.id}/options`).set('X-CSRF-Token', planner.csrf).send({ code: 'x', name: '', topology: 'spiral', positive: [], negative: [], surchargeCents: -1 });
    expect(bad.body.error.fields).toMatchObject({ code: 'Capital letters and digits only', name: 'Name the option', topology: 'Choose shunt or feedback', positive: 'Choose at least one device', surchargeCents: 'Surcharge cannot be negative' });
    const noR = await planner.post(`/api/models/${smd.id}/options`).set('X-CSRF-Token', planner.csrf).send({ code: 'T1', name: 'x', topology: 'feedback', network: { feedbackOhms: 1e5 }, positive: [si.id], negative: [si.id], surchargeCents: 0 });
    expect(noR.body.error.fields).toEqual({ 'network.groundOhms': 'Enter the resistor' });
    const code = `W${stamp}`.slice(0, 20);
    const res = await planner.post(`/api/models/${smd.id}/options`).set('X-CSRF-Token', planner.csrf).send({ code, name: 'Silicon against white LED', topology: 'shunt', network: { seriesOhms: 4700 }, positive: [si.id, si.id], negative: [white.id], surchargeCents: 500, published: false });
    expect(res.status).toBe(201);
    const o = res.body.model.options.find((x: { id: number }) => x.id === res.body.optionId);
    const diode = await t.knex('parts').where({ part_number: 'D-1N4148' }).first('unit_cost_cents');
    expect(o.bomDelta).toEqual([expect.objectContaining({ partNumber: 'D-1N4148', quantity: 2 })]);
    expect(o.deviceCents).toBe(2 * diode.unit_cost_cents);
    expect(o.flags).toEqual(['LED, white has no linked part']);
    expect(o.costCents).toBe(res.body.model.cost.totalCents + 2 * diode.unit_cost_cents);
    expect(o.engineInput.contract.clipper).toMatchObject({ topology: 'shunt', seriesOhms: 4700 });
    expect(o.engineInput.contract.clipper.positive).toHaveLength(2);
    const dupCode = await planner.post(`/api/models/${smd.id}/options`).set('X-CSRF-Token', planner.csrf).send({ code: 'SI2', name: 'x', topology: 'shunt', network: { seriesOhms: 1000 }, positive: [si.id], negative: [], surchargeCents: 0 });
    expect(dupCode.body.error.fields).toEqual({ code: 'SI2 already exists on this model' });
    const upd = await planner.patch(`/api/options/${o.id}`).set('X-CSRF-Token', planner.csrf).send({ negative: [si.id], published: true });
    const after = upd.body.model.options.find((x: { id: number }) => x.id === o.id);
    expect(after.flags).toEqual([]);
    expect(after.negative.map((d: { name: string }) => d.name)).toEqual(['Silicon small-signal (1N4148 type)']);
  });

  it('fits a custom device from datasheet points with the engine and links it to a part', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const points = [{ vf: 1.7, currentMa: 1 }, { vf: 1.86, currentMa: 10 }, { vf: 1.97, currentMa: 30 }];
    const res = await planner.post('/api/devices').set('X-CSRF-Token', planner.csrf).send({ name: `Orange LED ${stamp}`, kind: 'led', source: 'datasheet', points });
    expect(res.status).toBe(201);
    const expected = fitDevice(points.map((p) => ({ vf: p.vf, current: p.currentMa / 1000 })));
    expect(res.body.device.is).toBeCloseTo(expected.is, 20);
    expect(res.body.device.n).toBeCloseTo(expected.n, 9);
    expect(res.body.device.vfAt1mA).toBeCloseTo(1.7, 3);
    expect(res.body.device.vfAt10mA).toBeCloseTo(1.86, 3);
    const falling = await planner.post('/api/devices').set('X-CSRF-Token', planner.csrf).send({ name: `Bad ${stamp}`, kind: 'led', source: 'datasheet', points: [{ vf: 2, currentMa: 1 }, { vf: 1.5, currentMa: 10 }] });
    expect(falling.status).toBe(400);
    expect(falling.body.error.fields.points).toMatch(/must rise with current/);
    const spice = await planner.post('/api/devices').set('X-CSRF-Token', planner.csrf).send({ name: `Spice ${stamp}`, kind: 'silicon', source: 'spice', n: 20 });
    expect(spice.body.error.fields).toMatchObject({ is: 'Enter IS', n: 'N must be at most 10' });
    const part = await t.knex('parts').where({ part_number: 'LED-YEL-5' }).first('id');
    const linked = await planner.patch(`/api/devices/${res.body.device.deviceId}/part`).set('X-CSRF-Token', planner.csrf).send({ partId: part.id });
    expect(linked.body.device).toMatchObject({ partId: part.id, partNumber: 'LED-YEL-5' });
    const list = await (await signedInAgent(t.app, DEMO.assembler)).get('/api/devices').expect(200);
    expect(list.body.devices.filter((d: { presetKey: string | null }) => d.presetKey).length).toBe(9);
  });
});
