import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findPreset, perUnitCircuit, resolveCircuit } from '../../shared/engine';
import { optionCircuit } from '../../shared/catalog/circuit';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { expectTableAgreesWithNgspice } from '../support/spec-sheet-ngspice';
import { fetchBinary, insertBatch, insertOrder, userId } from './spec-sheets-setup';

const t = startTestApp();
afterAll(() => t.stop());

// Measured Vf at 1 mA in slot order (negative side first): red LED, then silicon — invented bench readings.
const UNIT_A = [1.792, 0.603];
const UNIT_B = [1.861, 0.571];

async function pdfText(pdf: Buffer) {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  const result = await parser.getText();
  await parser.destroy();
  return result.text;
}

/** The unit's circuit: the seeded option's presets on the revision's drive stage, IS refitted to the readings. */
async function unitCircuit(vf: number[]) {
  const option = await t.knex('clipping_options as c').join('models as m', 'm.id', 'c.model_id').where({ 'm.sku': 'HM-SMD', 'c.code': 'ASYM' }).first('c.topology', 'c.network', 'm.active_revision_id');
  const r = await t.knex('model_revisions').where({ id: option.active_revision_id }).first();
  const spec = optionCircuit(
    { minGain: r.drive_min_gain, maxGain: r.drive_max_gain, taper: r.drive_taper, inputPeakV: r.input_peak_v, supplyV: r.supply_v, referenceDrive: r.reference_drive },
    { topology: option.topology, network: option.network, positive: [findPreset('si-small-signal')!.model], negative: [findPreset('led-red')!.model] },
  );
  return perUnitCircuit(resolveCircuit(spec), { positive: [vf[1]], negative: [vf[0]], testCurrentA: 1e-3 });
}

let tester: TestAgent;
let batch: Awaited<ReturnType<typeof insertBatch>>;
let order: { orderId: number; orderLineId: number };

beforeAll(async () => {
  tester = await signedInAgent(t.app, DEMO.tester);
  const customer = await userId(t.knex, DEMO.customer);
  const option = await t.knex('clipping_options as c').join('models as m', 'm.id', 'c.model_id').where({ 'm.sku': 'HM-SMD', 'c.code': 'ASYM' }).first('c.id');
  order = await insertOrder(t.knex, customer, option.id, 1);
  batch = await insertBatch(t.knex, [{ vf: UNIT_A }, { vf: UNIT_B }], { orderId: order.orderId, orderLineId: order.orderLineId });
  // Only the first unit is on the order; the second is a stock build.
  await t.knex('units').where({ id: batch.units[1].id }).update({ order_id: null });
});

describe('a unit passed at the bench', () => {
  it('gets its sheet stored and attached to the "built and passed" mail', async () => {
    const unit = batch.units[0];
    const predicted = (await t.knex('units').where({ id: unit.id }).first('predicted')).predicted.thdPercent as number;
    await tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', tester.csrf)
      .send({ currentDrawMa: 7.4, measuredThdPercent: Number((predicted * 1.03).toFixed(2)), outcome: 'pass', reason: '' }).expect(201);
    const stored = await t.knex('spec_sheets').where({ unit_id: unit.id }).first();
    expect(stored).toMatchObject({ version: 1 });
    const mail = await t.knex('outbox').where({ dedupe_key: `unit-passed:${unit.id}` }).first();
    expect(mail.attachments).toEqual([{ filename: `spec-sheet-${unit.serial}.pdf`, fileId: stored.file_id }]);

    // The file it points at is the stored PDF (the outbox sender attaches files by id: see outbox-smtp.test.ts).
    const file = await t.knex('files').where({ id: stored.file_id }).first('content_type', 'data');
    expect(file.content_type).toBe('application/pdf');
    expect(file.data.subarray(0, 5).toString('latin1')).toBe('%PDF-');
  });

  it('serves a PDF whose serial, option and a harmonic table that agrees with ngspice for its measured devices', async () => {
    const unit = batch.units[0];
    const res = await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`);
    expect(res.headers['content-type']).toBe('application/pdf');
    const text = await pdfText(res.body);
    expect(text).toContain(unit.serial);
    expect(text).toContain(batch.option.optionName);
    expect(text).toContain(batch.option.modelName);
    expect(text).toContain('1792 mV');
    expect(text).toContain('603 mV');
    expect(text).toContain('Passed');
    expect(text).toContain(`/verify/${unit.serial}`);
    expectTableAgreesWithNgspice(text, await unitCircuit(UNIT_A));
    // The stored file is what was served.
    const file = await t.knex('spec_sheets as s').join('files as f', 'f.id', 's.file_id').where('s.unit_id', unit.id).first('f.data');
    expect(Buffer.compare(file.data, res.body)).toBe(0);
    // Page 1 as a picture for people to look at (test-results/ is git-ignored; docs/ holds a copy).
    mkdirSync('test-results', { recursive: true });
    writeFileSync('test-results/spec-sheet-api.pdf', res.body);
    execFileSync('pdftoppm', ['-r', '110', '-png', '-singlefile', '-f', '1', '-l', '1', 'test-results/spec-sheet-api.pdf', 'test-results/spec-sheet-page1']);
  });

  it('keeps the stored sheet when data changes later, until someone regenerates it (logged)', async () => {
    const unit = batch.units[0];
    const before = (await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`)).body;
    const slot = batch.option.slots[1];
    await t.knex('unit_devices').where({ unit_id: unit.id, option_device_id: slot.id }).update({ measured_vf: 0.640 });
    const same = (await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`)).body;
    expect(Buffer.compare(before, same)).toBe(0);

    const regen = await tester.post(`/api/units/${unit.serial}/spec-sheet/regenerate`).set('X-CSRF-Token', tester.csrf).expect(200);
    expect(regen.body).toMatchObject({ serial: unit.serial, version: 2 });
    const after = await pdfText((await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`)).body);
    expect(after).toContain('640 mV');
    expectTableAgreesWithNgspice(after, await unitCircuit([UNIT_A[0], 0.640]));
    const event = await t.knex('unit_events').where({ unit_id: unit.id, kind: 'spec-sheet' }).first();
    expect(event.message).toContain('version 2');
    expect(event.user_id).toBe(await userId(t.knex, DEMO.tester));
  });

  it('refuses to regenerate a unit that has not passed (409)', async () => {
    await tester.post(`/api/units/${batch.units[1].serial}/spec-sheet/regenerate`).set('X-CSRF-Token', tester.csrf).expect(409);
  });
});

describe('the demo scenario', () => {
  it('stored the sheet of the unit its seed passed at the bench, with that unit’s own table', async () => {
    const unit = await t.knex('units as u').join('batches as b', 'b.id', 'u.batch_id').where('b.notes', 'Demo stock batch').where('u.state', 'passed')
      .orderBy('u.sequence').first('u.id', 'u.serial');
    expect(unit, 'the production seed passes one demo unit').toBeTruthy();
    expect(await t.knex('spec_sheets').where({ unit_id: unit.id }).first()).toBeTruthy();
    const { body } = await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`);
    const text = await pdfText(body);
    expect(text).toContain(unit.serial);
    expect(text).toContain('Passed');
    expect(text).toContain('Computed from the forward voltages measured on this unit');
    // Page 1 of the demo sheet, for docs/spec-sheet-page1.png.
    mkdirSync('test-results', { recursive: true });
    writeFileSync('test-results/demo-spec-sheet.pdf', body);
    execFileSync('pdftoppm', ['-r', '110', '-png', '-singlefile', '-f', '1', '-l', '1', 'test-results/demo-spec-sheet.pdf', 'test-results/demo-spec-sheet-page1']);
  });
});

describe('a unit not yet passed', () => {
  it('gets a sheet made on demand, not stored, with its own table from its own readings', async () => {
    const unit = batch.units[1];
    const res = await fetchBinary(tester, `/api/units/${unit.serial}/spec-sheet.pdf`);
    const text = await pdfText(res.body);
    expect(text).toContain(unit.serial);
    expect(text).toContain('This unit has no bench test recorded yet.');
    expectTableAgreesWithNgspice(text, await unitCircuit(UNIT_B));
    expect(await t.knex('spec_sheets').where({ unit_id: unit.id }).first()).toBeUndefined();
  });

  it('renders page 1 to a picture that is not blank (pdftoppm from poppler-utils)', async () => {
    const res = await fetchBinary(tester, `/api/units/${batch.units[1].serial}/spec-sheet.pdf`);
    const dir = mkdtempSync(path.join(tmpdir(), 'kneepoint-api-sheet-'));
    const file = path.join(dir, 'sheet.pdf');
    writeFileSync(file, res.body);
    execFileSync('pdftoppm', ['-r', '30', '-gray', '-f', '1', '-l', '1', file, path.join(dir, 'page')]);
    const pgm = readFileSync(path.join(dir, 'page-1.pgm'));
    const header = pgm.subarray(0, 20).toString('latin1').split('\n');
    const pixels = pgm.subarray(header.slice(0, 3).join('\n').length + 1);
    expect(pixels.filter((v) => v < 128).length / pixels.length).toBeGreaterThan(0.03);
  });
});
