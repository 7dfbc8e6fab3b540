import { describe, expect, it } from 'vitest';
import wavefile from 'wavefile';
import { PDFParse } from 'pdf-parse';
import { formatDbc, formatPercent } from '../../server/pdf/spec-sheet';
import { anonymousAgent, type TestAgent } from '../support/app';
import { makeCatalog } from './production-fixture';
import { buildAsJuno, readyJuno, useProductionApp } from './production-setup';

// Capture first: POST /api/captures/analyse reads a bench capture and records nothing; a test saved
// from a capture takes its THD and harmonics from it; a typed THD is needed only without one.

const { t, crew } = useProductionApp(['planner', 'owner', 'juno', 'tester', 'customer']);
const { WaveFile } = wavefile;

/** One stock build of the silicon-against-LED option, built by Juno with Vf readings: waiting for its bench test. */
async function builtUnit() {
  const c = await makeCatalog(t.knex);
  const { body } = await crew.planner.post('/api/batches').set('X-CSRF-Token', crew.planner.csrf).send({ revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.asym, quantity: 1 }] }).expect(201);
  await crew.planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
  await crew.planner.post(`/api/batches/${body.id}/kit`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
  const [unit] = await t.knex('units').where({ batch_id: body.id });
  const junoId = await readyJuno(t.knex, crew.planner);
  await crew.planner.post(`/api/batches/${body.id}/assignments`).set('X-CSRF-Token', crew.planner.csrf).send({ builds: [{ unitId: unit.id, assemblerId: junoId, date: '2027-01-05' }] }).expect(200);
  await buildAsJuno(t.knex, crew.juno, unit.id, c);
  return (await t.knex('units').where({ id: unit.id }).first()) as { id: number; serial: string; predicted: { thdPercent: number; harmonics: { order: number; dbc: number }[] } };
}

/**
 * A WAV of a 1 kHz-ish tone with stated harmonic amplitudes relative to full scale (`amplitudes[0]`
 * is H1), not a whole number of periods long, so the analysis meets it as it meets a real capture.
 */
function wav(amplitudes: number[], opts: { sampleRate?: number; seconds?: number; channels?: number; bits?: '16' | '32f' } = {}) {
  const { sampleRate = 48000, seconds = 0.5137, channels = 1, bits = '16' } = opts;
  const n = Math.round(sampleRate * seconds);
  const full = bits === '16' ? 32767 : 1;
  const s = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let x = 0;
    amplitudes.forEach((a, k) => { x += a * Math.sin((2 * Math.PI * (k + 1) * 1000.3 * i) / sampleRate + 0.4 * k); });
    s[i] = bits === '16' ? Math.round(x * full) : x;
  }
  const file = new WaveFile();
  file.fromScratch(channels, sampleRate, bits, channels === 1 ? s : Array.from({ length: channels }, () => s));
  return Buffer.from(file.toBuffer());
}

/** A capture whose harmonics are the unit's own prediction (levels above −100 dBc), H1 at half scale. */
function captureOfPrediction(predicted: { order: number; dbc: number }[], shiftDb: Record<number, number> = {}) {
  const amplitudes = Array.from({ length: 10 }, (_, k) => {
    const h = predicted.find((p) => p.order === k + 1);
    if (k === 0) return 0.5;
    if (!h || h.dbc < -100) return 0;
    return 0.5 * 10 ** ((h.dbc + (shiftDb[k + 1] ?? 0)) / 20);
  });
  return wav(amplitudes);
}

/** The unit's spec sheet as text (pdf-parse). */
async function sheetText(serial: string) {
  const res = await crew.planner.get(`/api/units/${serial}/spec-sheet.pdf`).buffer(true)
    .parse((r, cb) => { const b: Buffer[] = []; r.on('data', (d: Buffer) => b.push(d)); r.on('end', () => cb(null, Buffer.concat(b))); }).expect(200);
  const parser = new PDFParse({ data: new Uint8Array(res.body as Buffer) });
  const { text } = await parser.getText();
  await parser.destroy();
  return text;
}

const analyse = (agent: TestAgent) => agent.post('/api/captures/analyse').set('X-CSRF-Token', agent.csrf);

describe('POST /api/captures/analyse', () => {
  it('reads a capture with known content: fundamental, harmonics against full scale and in dBc, THD_F and THD_R', async () => {
    const before = { tests: (await t.knex('test_records').count({ n: '*' }).first())!.n, files: (await t.knex('files').count({ n: '*' }).first())!.n };
    // H1 at 0.5 of full scale, H2 = 10 % and H3 = 5 % of it: THD_F = √(0.1² + 0.05²) = 11.180 %,
    // THD_R = THD_F / √(1 + THD_F²) = 11.111 % (the definitions, closed form).
    const res = await analyse(crew.tester).attach('capture', wav([0.5, 0.05, 0.025]), 'bench.wav').expect(200);
    expect(Object.keys(res.body).sort()).toEqual(['bitsPerSample', 'channels', 'durationS', 'fundamentalHz', 'harmonics', 'sampleRate', 'thdFPercent', 'thdRPercent']);
    expect(res.body).toMatchObject({ sampleRate: 48000, channels: 1, bitsPerSample: 16 });
    expect(res.body.fundamentalHz).toBeCloseTo(1000.3, 1);
    expect(res.body.durationS).toBeCloseTo(0.5137, 3);
    expect(res.body.thdFPercent).toBeCloseTo(11.180, 2);
    expect(res.body.thdRPercent).toBeCloseTo(11.111, 2);
    const [h1, h2, h3] = res.body.harmonics;
    expect(Object.keys(h1).sort()).toEqual(['amplitudeFs', 'dbc', 'order']);
    expect(h1.order).toBe(1);
    expect(h1.amplitudeFs).toBeCloseTo(0.5, 3);
    expect(h2.amplitudeFs).toBeCloseTo(0.05, 3);
    expect(h2.dbc).toBeCloseTo(-20, 1);
    expect(h3.dbc).toBeCloseTo(20 * Math.log10(0.05), 1);
    // Records nothing.
    expect((await t.knex('test_records').count({ n: '*' }).first())!.n).toBe(before.tests);
    expect((await t.knex('files').count({ n: '*' }).first())!.n).toBe(before.files);
  });

  it('reads a full-scale sine as 1.0, from 16-bit PCM and from 32-bit float alike', async () => {
    const pcm = await analyse(crew.planner).attach('capture', wav([1], { sampleRate: 44100 }), 'full.wav').expect(200);
    expect(pcm.body.harmonics[0].amplitudeFs).toBeCloseTo(1, 3);
    const float = await analyse(crew.owner).attach('capture', wav([1], { bits: '32f', sampleRate: 96000, channels: 2 }), 'full.wav').expect(200);
    expect(float.body).toMatchObject({ bitsPerSample: 32, channels: 2, sampleRate: 96000 });
    expect(float.body.harmonics[0].amplitudeFs).toBeCloseTo(1, 3);
  });

  it('is for the tester, planner and owner only', async () => {
    const file = wav([0.5, 0.05]);
    expect((await analyse(crew.juno).attach('capture', file, 'bench.wav')).status).toBe(403);
    expect((await analyse(crew.customer).attach('capture', file, 'bench.wav')).status).toBe(403);
    const visitor = await anonymousAgent(t.app);
    const anonymous = await visitor.post('/api/captures/analyse').set('X-CSRF-Token', visitor.csrf).attach('capture', file, 'bench.wav');
    expect(anonymous.status).toBe(401);
  });

  it('refuses bad files with the test upload’s limits and words', async () => {
    const missing = await analyse(crew.tester).field('unitId', '');
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields.capture).toMatch(/Choose a WAV file/);
    const notWav = await analyse(crew.tester).attach('capture', Buffer.from('hello, not audio at all'), 'capture.wav');
    expect(notWav.status).toBe(400);
    expect(notWav.body.error.fields.capture).toMatch(/Not a WAV file/);
    const text = await analyse(crew.tester).attach('capture', Buffer.from('notes'), { filename: 'notes.txt', contentType: 'text/plain' });
    expect(text.status).toBe(400);
    expect(text.body.error.fields.capture).toBe('Only .wav files');
    const rate = await analyse(crew.tester).attach('capture', wav([0.5, 0.05], { sampleRate: 22050 }), 'capture.wav');
    expect(rate.status).toBe(400);
    expect(rate.body.error.fields.capture).toMatch(/22050 Hz: use 44\.1, 48 or 96 kHz/);
    const short = await analyse(crew.tester).attach('capture', wav([0.5, 0.05], { seconds: 0.05 }), 'capture.wav');
    expect(short.status).toBe(400);
    expect(short.body.error.fields.capture).toMatch(/0\.05 s/);
    const silent = await analyse(crew.tester).attach('capture', wav([0]), 'capture.wav');
    expect(silent.status).toBe(400);
    expect(silent.body.error.message).toMatch(/No test tone/);
    const big = await analyse(crew.tester).attach('capture', Buffer.alloc(13 * 1024 * 1024, 1), 'capture.wav');
    expect(big.status).toBe(413);
    expect(big.body.error.message).toMatch(/larger than 12 MB/);
    const wrongField = await analyse(crew.tester).attach('file', wav([0.5]), 'capture.wav');
    expect(wrongField.status).toBe(400);
    expect(wrongField.body.error.message).toMatch(/“capture” field/);
  });

  it('with unitId puts the unit’s prediction at the reference setting and the comparison beside the reading', async () => {
    const unit = await builtUnit();
    const res = await analyse(crew.tester).field('unitId', String(unit.id)).attach('capture', captureOfPrediction(unit.predicted.harmonics), 'bench.wav').expect(200);
    expect(res.body.unit).toEqual({ id: unit.id, serial: unit.serial });
    expect(res.body.prediction.referenceDrive).toBe(0.5);
    expect(res.body.prediction.thdFPercent).toBeCloseTo(unit.predicted.thdPercent, 6);
    // THD_R of the same harmonics: THD_F / √(1 + THD_F²).
    const f = unit.predicted.thdPercent / 100;
    expect(res.body.prediction.thdRPercent).toBeCloseTo((100 * f) / Math.sqrt(1 + f * f), 6);
    // The capture was made from the prediction, so it reads the predicted THD and every harmonic within its band.
    expect(res.body.thdFPercent).toBeCloseTo(unit.predicted.thdPercent, 0);
    expect(res.body.comparison.within).toBe(true);
    expect(res.body.comparison.harmonics.map((h: { order: number }) => h.order)).toEqual([2, 3, 4, 5, 6, 7, 8]);
    expect(res.body.comparison.tolerances).toEqual({ thdPercent: 15, harmonicDb: 3 });
    const h2 = res.body.comparison.harmonics[0];
    expect(h2.highDbc - h2.lowDbc).toBeCloseTo(6, 6);
    expect(h2.measuredDbc).toBeGreaterThan(h2.lowDbc);
    expect(h2.measuredDbc).toBeLessThan(h2.highDbc);

    const off = await analyse(crew.planner).field('unitId', String(unit.id)).attach('capture', captureOfPrediction(unit.predicted.harmonics, { 3: 8 }), 'bench.wav').expect(200);
    expect(off.body.comparison.within).toBe(false);
    expect(off.body.comparison.harmonics[1].within).toBe(false);
    expect(off.body.comparison.problems.join(' ')).toMatch(/H3 measured −[\d.]+ dBc against the predicted −[\d.]+ dBc \(±3 dB\)/);
    expect(await t.knex('test_records').where({ unit_id: unit.id }).first()).toBeUndefined();
  });

  it('answers 404 for a unit that does not exist and 400 for a malformed unitId', async () => {
    const missing = await analyse(crew.tester).field('unitId', '2147483000').attach('capture', wav([0.5, 0.05]), 'bench.wav');
    expect(missing.status).toBe(404);
    const bad = await analyse(crew.tester).field('unitId', '12abc').attach('capture', wav([0.5, 0.05]), 'bench.wav');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.unitId).toBe('Choose a unit');
  });
});

describe('saving a bench test', () => {
  it('refuses a test with neither a capture nor a typed THD (an empty box is not 0 %)', async () => {
    const unit = await builtUnit();
    for (const typed of [undefined, '', '   ']) {
      let req = crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('outcome', 'pass');
      if (typed !== undefined) req = req.field('measuredThdPercent', typed);
      const res = await req;
      expect(res.status).toBe(400);
      expect(res.body.error.fields.measuredThdPercent).toMatch(/Enter the measured THD/);
    }
    const json = await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).send({ currentDrawMa: 8, outcome: 'pass' });
    expect(json.status).toBe(400);
    expect(await t.knex('test_records').where({ unit_id: unit.id }).first()).toBeUndefined();
  });

  it('takes the THD from the capture, not a typed box, and names prediction and measurement when out of tolerance', async () => {
    const unit = await builtUnit();
    const both = await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('measuredThdPercent', '0').field('outcome', 'pass')
      .attach('capture', captureOfPrediction(unit.predicted.harmonics), 'bench.wav');
    expect(both.status).toBe(400);
    expect(both.body.error.fields.measuredThdPercent).toMatch(/read from the capture/);

    const off = await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('outcome', 'pass')
      .attach('capture', captureOfPrediction(unit.predicted.harmonics, { 2: -9 }), 'bench.wav');
    expect(off.status).toBe(400);
    expect(off.body.error.fields.reason).toMatch(/H2 measured −[\d.]+ dBc against the predicted −[\d.]+ dBc/);

    const typedOff = await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('outcome', 'pass')
      .field('measuredThdPercent', (unit.predicted.thdPercent * 2).toFixed(2));
    expect(typedOff.status).toBe(400);
    expect(typedOff.body.error.fields.reason).toContain(`THD measured ${(unit.predicted.thdPercent * 2).toFixed(2)} % against the predicted ${unit.predicted.thdPercent.toFixed(2)} %`);

    const ok = await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8.2').field('outcome', 'pass')
      .attach('capture', captureOfPrediction(unit.predicted.harmonics), 'bench.wav').expect(201);
    expect(ok.body.withinTolerance).toBe(true);
    const record = await t.knex('test_records').where({ unit_id: unit.id }).first();
    expect(record.measured_thd_percent).toBeCloseTo(ok.body.capture.thdFPercent, 9);
    expect(record.measured_thd_r_percent).toBeCloseTo(ok.body.capture.thdRPercent, 9);
    expect(record.harmonic_tolerance_db).toBe(3);
    expect(record.measured_harmonics).toHaveLength(10);
    expect(record.measured_harmonics[0]).toMatchObject({ order: 1, dbc: 0 });
    expect(record.measured_harmonics[0].amplitudeFs).toBeCloseTo(0.5, 3);

    // The unit page's data carries the measured harmonics beside the prediction.
    const page = await crew.planner.get(`/api/units/${unit.id}`).expect(200);
    expect(page.body.tests[0].measuredHarmonics).toHaveLength(10);
    expect(page.body.tests[0].measuredThdRPercent).toBeCloseTo(record.measured_thd_r_percent, 9);
    expect(page.body.harmonicToleranceDb).toBe(3);

    // The stored spec sheet prints the measured column beside the reference prediction: H1…H8, THD_F, THD_R.
    const text = await sheetText(unit.serial);
    const lines = text.split('\n');
    expect(lines.find((l) => l.includes('Harmonic (dBc)'))).toMatch(/Reference \(50 %\)\s+Measured\s+High drive/);
    const measured = record.measured_harmonics as { order: number; dbc: number }[];
    for (const order of [2, 3]) {
      const row = lines.find((l) => l.trim().startsWith(`H${order}`))!;
      // Columns: low, reference, measured, high; the measured one is the capture's level to one decimal.
      expect(row.trim().split(/\s+/)[3]).toBe(formatDbc(measured[order - 1].dbc));
    }
    expect(lines.find((l) => l.trim().startsWith('THD_F') && l.includes('%'))).toContain(formatPercent(record.measured_thd_percent / 100));
    expect(lines.find((l) => l.trim().startsWith('THD_R') && l.includes('%'))).toContain(formatPercent(record.measured_thd_r_percent / 100));
    expect(text).toContain('read from its WAV capture');
  });

  it('keeps a typed THD when there is no capture, with no harmonics', async () => {
    const unit = await builtUnit();
    const typed = (unit.predicted.thdPercent * 1.02).toFixed(2);
    await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('measuredThdPercent', typed).field('outcome', 'pass').expect(201);
    const record = await t.knex('test_records').where({ unit_id: unit.id }).first();
    expect(record.measured_thd_percent).toBe(Number(typed));
    expect(record.measured_harmonics).toBeNull();
    expect(record.measured_thd_r_percent).toBeNull();
    // The sheet's measured column has the typed THD_F and a dash where nothing was measured.
    const lines = (await sheetText(unit.serial)).split('\n');
    expect(lines.find((l) => l.trim().startsWith('H2'))!.trim().split(/\s+/)[3]).toBe('—');
    expect(lines.find((l) => l.trim().startsWith('THD_F') && l.includes('%'))).toContain(formatPercent(Number(typed) / 100));
  });
});
