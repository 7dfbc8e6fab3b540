// The option designer's search against the profile contract: every candidate's `at` is the profile
// computation for its clipper, a target copied from a circuit in the space is found at distance 0
// (checked against an independent enumeration), unreachable targets still give the nearest.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ONSET_NEVER_PERCENT, countCandidates, designSearch, enumerateCandidates, parseDesignInput, runDesign, targetDistance, type DesignCandidate } from '../../shared/design/search';
import { candidateBom, capacitanceFromValue, suggestedSurchargeCents } from '../../shared/design/costing';
import { eSeriesValues } from '../../shared/design/schema';
import { DEVICE_PRESETS, clippingOnset, computeProfile, driveSweep, findPreset, onsetDrive, runContract, type CircuitSpec, type ContractOutput } from '../../shared/engine/index';

const STAGE = { toneHz: 1000, inputPeakV: 0.1, driveGain: 40, railPeakV: 4.5, temperatureC: 27, harmonics: 10 };
const PRESETS = ['si-small-signal', 'led-red', 'germanium-point-contact'];
const SPACE = {
  ...STAGE, devices: PRESETS, maxPerSide: 2, topologies: ['shunt', 'feedback'],
  seriesOhms: [2200, 4700], feedbackOhms: 100000, groundOhms: 4700,
};
const roundTrip = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

const dir = mkdtempSync(join(tmpdir(), 'kneepoint-design-'));
function cli(script: 'profile' | 'design', name: string, body: unknown): { status: number | null; json: Record<string, unknown> } {
  const file = join(dir, name);
  writeFileSync(file, typeof body === 'string' ? body : JSON.stringify(body));
  const r = spawnSync('npm', ['run', '--silent', script, '--', file], { encoding: 'utf8', cwd: process.cwd() });
  const lines = r.stdout.trim().split('\n');
  expect(lines.length).toBe(1);
  return { status: r.status, json: JSON.parse(lines[0]) as Record<string, unknown> };
}

/** The space enumerated here independently of the search: plain nested loops over contract JSON. */
function independentSpace(): { clipper: Record<string, unknown>; at: ContractOutput }[] {
  const out: { clipper: Record<string, unknown>; at: ContractOutput }[] = [];
  const sides = PRESETS.flatMap((p) => [1, 2].map((count) => Array.from({ length: count }, () => ({ preset: p }))));
  const networks: Record<string, unknown>[] = [
    ...SPACE.seriesOhms.map((r) => ({ topology: 'shunt', seriesOhms: r })),
    { topology: 'feedback', feedbackOhms: 100000, groundOhms: 4700 },
  ];
  for (const net of networks) {
    for (let i = 0; i < sides.length; i++) {
      // Mirror images (the sides swapped) are one candidate: the pair with the earlier string on the positive side.
      for (let j = i; j < sides.length; j++) {
        const clipper = { ...net, positive: sides[i], negative: sides[j] };
        out.push({ clipper, at: runContract({ ...STAGE, clipper }) });
      }
    }
  }
  return out;
}

const quantities = (at: ContractOutput) => ({ thd: at.thdF * 100, h2h3: at.harmonics[1].dbc - at.harmonics[2].dbc, v1: at.fundamentalPeakV });

describe('option designer: enumeration and the profile contract', () => {
  const all = runDesign({ ...SPACE, target: { thdFPercent: [0, 100] }, limit: 200 });

  it('enumerates devices × 1…maxPerSide on each side independently, per topology and resistor, without mirror images', () => {
    // 3 devices × 2 counts = 6 strings per side; 6·7/2 = 21 pairs once mirror images are left out;
    // shunt × 2 resistors + feedback.
    expect(all.total).toBe(21 * 3);
    expect(all.searched).toBe(63);
    expect(all.failed).toBe(0);
    expect(all.candidates).toHaveLength(63);
    const key = (t: string, r: number, p: unknown, n: unknown) => JSON.stringify([t, r, p, n]);
    const keys = new Set(all.candidates.map((c) => key(c.clipper.topology, c.clipper.seriesOhms, c.strings.positive, c.strings.negative)));
    expect(keys.size).toBe(63);
    // No candidate's mirror image is also in the list, except the symmetric ones (their own mirror).
    const mirrored = all.candidates.filter((c) => keys.has(key(c.clipper.topology, c.clipper.seriesOhms, c.strings.negative, c.strings.positive)));
    expect(mirrored.every((c) => JSON.stringify(c.strings.positive) === JSON.stringify(c.strings.negative))).toBe(true);
    expect(mirrored).toHaveLength(6 * 3);
    const sym = parseDesignInput({ ...SPACE, symmetry: 'symmetric', target: { thdFPercent: [0, 1] } });
    expect(countCandidates(sym)).toBe(6 * 3);
    const asym = parseDesignInput({ ...SPACE, symmetry: 'asymmetric', topologies: ['shunt', 'none'], target: { thdFPercent: [0, 1] } });
    expect(countCandidates(asym)).toBe(15 * 2 + 1);
  });

  it('leaves out only mirror images: swapping the sides keeps THD_F, every harmonic and the fundamental, and flips DC', () => {
    for (const c of all.candidates.filter((x) => x.clipper.negative.length !== x.clipper.positive.length || x.strings.positive!.device !== x.strings.negative!.device)) {
      const mirror = runContract({ ...STAGE, clipper: { ...roundTrip(c.clipper), positive: roundTrip(c.clipper.negative), negative: roundTrip(c.clipper.positive) } });
      expect(mirror.thdF).toBeCloseTo(c.at.thdF, 12);
      expect(mirror.fundamentalPeakV).toBeCloseTo(c.at.fundamentalPeakV, 12);
      mirror.harmonics.forEach((h, i) => expect(h.dbc).toBeCloseTo(c.at.harmonics[i].dbc, 9));
      expect(mirror.dcV).toBeCloseTo(-c.at.dcV, 9);
    }
  });

  it("gives every candidate the contract function's output for its clipper, through JSON", () => {
    for (const c of all.candidates) {
      expect(roundTrip(c.at)).toEqual(runContract({ ...STAGE, clipper: roundTrip(c.clipper) }));
      // A candidate inside the (all-embracing) range has distance 0.
      expect(c.distance).toBe(0);
    }
  });

  it("matches the profile CLI's own output for sampled candidates, and the design CLI matches the function", () => {
    // Each spawn starts npm and tsx (seconds on a loaded machine): two samples, one per topology.
    for (const i of [0, 62]) {
      const c = all.candidates[i];
      const r = cli('profile', `p${i}.json`, { ...STAGE, clipper: c.clipper });
      expect(r.status).toBe(0);
      expect(r.json).toEqual(roundTrip(c.at));
    }
    const input = { ...SPACE, target: { thdFPercent: [3, 8], h2MinusH3Db: [0, 10] }, limit: 5 };
    const d = cli('design', 'd.json', input);
    expect(d.status).toBe(0);
    expect(d.json).toEqual(roundTrip(runDesign(input)));
  }, 300_000);
});

describe('option designer: ranking', () => {
  const space = independentSpace();

  it('finds a target copied from a circuit in the space at distance 0, exactly the circuits that meet it', () => {
    const chosen = space.find((s) => s.clipper.topology === 'shunt' && s.clipper.seriesOhms === 4700
      && (s.clipper.positive as unknown[]).length === 1 && (s.clipper.negative as { preset: string }[])[0].preset === 'led-red')!;
    const q = quantities(chosen.at);
    const target = { thdFPercent: [q.thd, q.thd], h2MinusH3Db: [q.h2h3, q.h2h3], fundamentalPeakV: [q.v1, q.v1] };
    const expected = space.filter((s) => {
      const v = quantities(s.at);
      return v.thd === q.thd && v.h2h3 === q.h2h3 && v.v1 === q.v1;
    });
    expect(expected.length).toBeGreaterThanOrEqual(1);
    const result = runDesign({ ...SPACE, target, limit: 200 });
    expect(result.searched).toBe(space.length);
    const zero = result.candidates.filter((c) => c.distance === 0);
    expect(zero.map((c) => roundTrip(c.at))).toEqual(expected.map((e) => e.at));
    expect(result.candidates[0].distance).toBe(0);
    // The chosen circuit's devices come back: one silicon up, red LEDs down.
    expect(zero.some((c) => c.strings.positive?.name === 'si-small-signal' && c.strings.negative?.name === 'led-red')).toBe(true);
    expect(result.candidates.slice(zero.length).every((c) => c.distance > 0)).toBe(true);
  });

  it('returns the nearest candidates, with distance > 0 and sorted, for an unreachable target', () => {
    const result = runDesign({ ...SPACE, target: { thdFPercent: [90, 95] }, limit: 4 });
    expect(result.candidates).toHaveLength(4);
    const d = result.candidates.map((c) => c.distance);
    expect(d.every((x) => x > 0)).toBe(true);
    expect([...d].sort((a, b) => a - b)).toEqual(d);
    // The nearest is the space's highest THD_F, found independently; its distance follows the documented formula.
    const maxThd = Math.max(...space.map((s) => s.at.thdF));
    expect(result.candidates[0].at.thdF).toBe(maxThd);
    expect(d[0]).toBeCloseTo((90 - maxThd * 100) / 5, 12);
  });

  it('sums range-width-normalised distances outside each range, with floors for narrow ranges', () => {
    const v = { thdFPercent: 12, h2MinusH3Db: -3, evenSharePercent: 50, fundamentalPeakV: 1 };
    expect(targetDistance({ thdFPercent: [5, 10] }, v)).toBeCloseTo(0.4, 12);
    expect(targetDistance({ thdFPercent: [5, 10], h2MinusH3Db: [0, 0] }, v)).toBeCloseTo(0.4 + 3, 12);
    expect(targetDistance({ fundamentalPeakV: [0.5, 2], evenSharePercent: [40, 60] }, v)).toBe(0);
  });
});

describe('option designer: the onset and a second drive level', () => {
  const CONTROL = { minGain: 1, maxGain: 200, taper: 'log' as const };
  const SMALL = { ...STAGE, devices: PRESETS, maxPerSide: 1, topologies: ['shunt', 'feedback'], seriesOhms: [4700], feedbackOhms: 100000, groundOhms: 4700, drive: CONTROL, limit: 50 };
  const circuitOf = (clipper: unknown, shuntFarads = 0): CircuitSpec => ({
    clipper: { ...(clipper as object), ...(shuntFarads ? { shuntFarads } : {}) }, toneHz: 1000, temperatureC: 27,
    drive: { ...CONTROL, inputPeakV: STAGE.inputPeakV, railPeakV: STAGE.railPeakV },
  });

  it("finds the onset as the profile's 25-point sweep does, computing only up to the crossing", () => {
    const si = { topology: 'shunt', seriesOhms: 4700, positive: [{ preset: 'si-small-signal' }], negative: [{ preset: 'led-red' }, { preset: 'led-red' }] };
    for (const spec of [circuitOf(si), circuitOf(si, 4.7e-8), circuitOf({ topology: 'none' })]) {
      expect(onsetDrive(spec)).toBe(computeProfile(spec).clippingOnsetDrive);
      expect(onsetDrive(spec)).toBe(clippingOnset(driveSweep(spec, 25)));
    }
  });

  it("bisects a static network's sweep to the same onset as walking all of it, at every crossing, at drive 0 and never", () => {
    // Every circuit of a space at two drive stages: THD_F rises with the drive, so bisection over the
    // sweep's own points gives the sweep's first crossing exactly.
    const stages = [
      { ...CONTROL, inputPeakV: 0.1, railPeakV: 4.5 },
      { minGain: 2, maxGain: 500, taper: 'linear' as const, inputPeakV: 0.03, railPeakV: 9 },
    ];
    const parsed = parseDesignInput({ ...SPACE, maxPerSide: 3, topologies: ['shunt', 'feedback', 'none'], target: { thdFPercent: [0, 1] } });
    const seen = new Set<string>();
    for (const drive of stages) {
      for (const c of enumerateCandidates(parsed.input, parsed.devices)) {
        const spec: CircuitSpec = { clipper: roundTrip(c.clipper), toneHz: 1000, temperatureC: 27, drive };
        const walked = clippingOnset(driveSweep(spec, 25));
        expect(onsetDrive(spec)).toBe(walked);
        seen.add(walked === null ? 'never' : walked === 0 ? 'at 0' : 'between');
      }
    }
    // The space holds onsets between sweep points and at drive 0.
    expect([...seen].sort()).toEqual(['at 0', 'between']);
    // Above 1 % from the start (germanium, a hot input), and never (no clipper, a rail out of reach).
    const hot: CircuitSpec = { ...circuitOf({ topology: 'shunt', seriesOhms: 1000, positive: [{ preset: 'germanium-point-contact' }], negative: [{ preset: 'germanium-point-contact' }] }), drive: { ...CONTROL, inputPeakV: 2, railPeakV: null } };
    expect(clippingOnset(driveSweep(hot, 25))).toBe(0);
    expect(onsetDrive(hot)).toBe(0);
    const clean: CircuitSpec = { ...circuitOf({ topology: 'none' }), drive: { ...CONTROL, inputPeakV: 0.1, railPeakV: 1000 } };
    expect(clippingOnset(driveSweep(clean, 25))).toBeNull();
    expect(onsetDrive(clean)).toBeNull();
    // Other sweep sizes too (computeProfile's sweepPoints).
    const si = circuitOf({ topology: 'shunt', seriesOhms: 4700, positive: [{ preset: 'si-small-signal' }], negative: [{ preset: 'led-red' }] });
    for (const points of [2, 3, 13, 101]) expect(onsetDrive(si, points)).toBe(clippingOnset(driveSweep(si, points)));
  });

  it("gives every candidate the profile's onset and the profile CLI's output at the second gain", () => {
    const r = runDesign({ ...SMALL, target: { onsetDrivePercent: [0, 100], second: { driveGain: 150, thdFPercent: [0, 100] } } });
    expect(r.searched).toBe(2 * 6);
    for (const c of r.candidates) {
      expect(c.onsetDrive).toBe(computeProfile(circuitOf(roundTrip(c.clipper))).clippingOnsetDrive);
      const { evenEnergyShare, ...second } = c.second!;
      expect(evenEnergyShare).toBeGreaterThanOrEqual(0);
      expect(roundTrip(second)).toEqual(runContract({ ...STAGE, driveGain: 150, clipper: roundTrip(c.clipper) }));
    }
  });

  it('finds an onset and a second-drive THD_F copied from one circuit at distance 0, exactly the circuits that meet both', () => {
    const all = runDesign({ ...SMALL, target: { onsetDrivePercent: [0, 100], second: { driveGain: 150, thdFPercent: [0, 100] } } }).candidates;
    const chosen = all.find((c) => c.onsetDrive !== null && c.strings.negative?.name === 'led-red')!;
    const onset = chosen.onsetDrive! * 100;
    const thd2 = chosen.second!.thdF * 100;
    const r = runDesign({ ...SMALL, target: { onsetDrivePercent: [onset, onset], second: { driveGain: 150, thdFPercent: [thd2, thd2] } } });
    const expected = all.filter((c) => c.onsetDrive !== null && c.onsetDrive! * 100 === onset && c.second!.thdF * 100 === thd2);
    const zero = r.candidates.filter((c) => c.distance === 0);
    expect(zero.length).toBeGreaterThanOrEqual(1);
    expect(zero.map((c) => c.strings)).toEqual(expected.map((c) => c.strings));
    // The onset term of the distance: (how far outside) / max(width, 5 % of the control).
    const wide = runDesign({ ...SMALL, target: { onsetDrivePercent: [onset + 10, onset + 30] } }).candidates.find((c) => JSON.stringify(c.strings) === JSON.stringify(chosen.strings))!;
    expect(wide.distance).toBeCloseTo(10 / 20, 9);
    // A candidate that never reaches 1 % counts as onset one sweep step past the top.
    const none = runDesign({ ...SMALL, topologies: ['none'], railPeakV: 1000, target: { onsetDrivePercent: [0, 50] } }).candidates[0];
    expect(none.onsetDrive).toBeNull();
    expect(none.distance).toBeCloseTo((ONSET_NEVER_PERCENT - 50) / 50, 9);
  });

  it('refuses an onset target without the drive control, and a second level without a range', () => {
    const { drive: _drive, ...noDrive } = SMALL;
    expect(() => runDesign({ ...noDrive, target: { onsetDrivePercent: [10, 20] } })).toThrow(expect.objectContaining({ path: 'drive' }));
    expect(() => runDesign({ ...SMALL, target: { second: { driveGain: 100 } } })).toThrow(expect.objectContaining({ path: 'target.second' }));
  });
});

describe('option designer: progress, cancellation, input', () => {
  it('reports progress and stops between candidates when asked', () => {
    const seen: number[] = [];
    let calls = 0;
    const r = runDesign({ ...SPACE, target: { thdFPercent: [0, 1] } }, { progressEvery: 5, onProgress: (done) => seen.push(done), shouldStop: () => ++calls > 12 });
    expect(r.cancelled).toBe(true);
    expect(r.searched).toBe(12);
    expect(seen).toEqual([5, 10, 12]);
    const aborted = runDesign({ ...SPACE, target: { thdFPercent: [0, 1] } }, { signal: { aborted: true } });
    expect(aborted.searched).toBe(0);
  });

  it('expands E-series ranges', () => {
    expect(eSeriesValues('E6', 1000, 4700)).toEqual([1000, 1500, 2200, 3300, 4700]);
    expect(eSeriesValues('E12', 1, 2)).toEqual([1, 1.2, 1.5, 1.8]);
    expect(parseDesignInput({ ...SPACE, seriesOhms: { eSeries: 'E12', min: 1000, max: 10000 }, target: { thdFPercent: [0, 1] } }).input.seriesOhms).toEqual({ eSeries: 'E12', min: 1000, max: 10000 });
  });

  it('refuses invalid input with the field path, as EngineInputError', () => {
    const cases: [unknown, string][] = [
      [{ ...SPACE, maxPerSide: 0, target: { thdFPercent: [1, 2] } }, 'maxPerSide'],
      [{ ...SPACE, devices: ['si-small-signal', { is: 1e-9, n: 20 }], target: { thdFPercent: [1, 2] } }, 'devices[1].n'],
      [{ ...SPACE, devices: ['no-such-device'], target: { thdFPercent: [1, 2] } }, 'devices[0]'],
      [{ ...SPACE, target: { thdFPercent: [5, 1] } }, 'target.thdFPercent'],
      [{ ...SPACE, target: {} }, 'target'],
      [{ ...SPACE, seriesOhms: undefined, target: { thdFPercent: [1, 2] } }, 'seriesOhms'],
      [{ ...SPACE, seriesOhms: eSeriesValues('E24', 10, 1e7), target: { thdFPercent: [1, 2] } }, 'seriesOhms'],
      [{ ...SPACE, devices: DEVICE_PRESETS.map((p) => p.id), maxPerSide: 6, seriesOhms: { eSeries: 'E24', min: 10, max: 9100 }, capacitorFarads: [0, 1e-9, 1e-8], target: { thdFPercent: [1, 2] } }, ''],
    ];
    for (const [body, path] of cases) {
      expect(() => runDesign(body)).toThrow(expect.objectContaining({ name: 'EngineInputError', path }));
    }
  });

  it('exits 2 with {error: {message, path}} from the CLI for invalid input and bad JSON', () => {
    const r = cli('design', 'bad.json', { ...SPACE, devices: ['si-small-signal', { is: 1e-9, n: 20 }], target: { thdFPercent: [1, 2] } });
    expect(r.status).toBe(2);
    expect(r.json).toEqual({ error: { message: expect.stringMatching(/n/), path: 'devices[1].n' } });
    const broken = cli('design', 'broken.json', '{"devices": ');
    expect(broken.status).toBe(2);
    expect((broken.json.error as { message: string }).message).toMatch(/not valid JSON/);
  }, 300_000);

  it('searches copies of one device once, and takes a library of more than 40 devices when its space fits', () => {
    const si = findPreset('si-small-signal')!.model;
    const copies = Array.from({ length: 60 }, (_, i) => ({ name: `silicon copy ${i}`, ...si }));
    const parsed = parseDesignInput({ ...SPACE, devices: [...copies.slice(0, 1), ...PRESETS, ...copies.slice(1)], target: { thdFPercent: [0, 1] } });
    // The first copy stands for the preset too (same parameters): 3 distinct devices, positions 0, 2, 3.
    expect(parsed.devices.map((d) => [d.index, d.name])).toEqual([[0, 'silicon copy 0'], [2, 'led-red'], [3, 'germanium-point-contact']]);
    expect(countCandidates(parsed)).toBe(21 * 3);
    const r = designSearch(parsed, {});
    expect(r.candidates.every((c) => [0, 2, 3].includes(c.strings.positive!.device))).toBe(true);
    // 45 distinct devices, one per side, symmetric, shunt at one value: 45 candidates, searched in full.
    const many = Array.from({ length: 45 }, (_, i) => ({ name: `d${i}`, is: 1e-9 * (1 + i / 10), n: 1.8, rs: 1 }));
    const big = runDesign({ ...SPACE, devices: many, maxPerSide: 1, symmetry: 'symmetric', topologies: ['shunt'], seriesOhms: [2200], target: { thdFPercent: [0, 100] }, limit: 50 });
    expect(big.searched).toBe(45);
    expect(new Set(big.candidates.map((c) => c.strings.positive!.name)).size).toBe(45);
  });

  it('names preset devices by id and keeps their parameters', () => {
    const r = runDesign({ ...SPACE, devices: ['led-red'], maxPerSide: 1, topologies: ['shunt'], seriesOhms: [1000], target: { thdFPercent: [0, 100] } });
    const c: DesignCandidate = r.candidates[0];
    expect(c.clipper.positive).toEqual([findPreset('led-red')!.model]);
    expect(c.strings.positive).toEqual({ device: 0, name: 'led-red', count: 1 });
  });
});

describe('option designer: parts, cost and surcharge of a candidate', () => {
  it('reads capacitances from part values', () => {
    expect(capacitanceFromValue('47 nF film 63 V')).toBe(4.7e-8);
    expect(capacitanceFromValue('100 pF C0G 50 V')).toBe(1e-10);
    expect(capacitanceFromValue('1 µF film 63 V')).toBe(1e-6);
    expect(capacitanceFromValue('2k2 1 % 0.25 W')).toBeNull();
  });

  it('adds one linked part per device and the capacitor, and names devices without a part', () => {
    const devices = [
      { name: 'Si', partId: 1, partNumber: 'D-SI', unitCostCents: 5 },
      { name: 'Red', partId: 2, partNumber: 'D-RED', unitCostCents: 12 },
      { name: 'Loose', partId: null, partNumber: null, unitCostCents: null },
    ];
    const cap = { partId: 9, partNumber: 'C-47N', farads: 4.7e-8, unitCostCents: 16 };
    const bom = candidateBom({ positive: { device: 0, count: 2 }, negative: { device: 1, count: 1 } }, devices, cap);
    expect(bom.lines).toEqual([{ partNumber: 'D-SI', quantity: 2, unitCostCents: 5 }, { partNumber: 'D-RED', quantity: 1, unitCostCents: 12 }, { partNumber: 'C-47N', quantity: 1, unitCostCents: 16 }]);
    expect(bom.cents).toBe(2 * 5 + 12 + 16);
    const same = candidateBom({ positive: { device: 0, count: 1 }, negative: { device: 0, count: 3 } }, devices, null);
    expect(same.lines).toEqual([{ partNumber: 'D-SI', quantity: 4, unitCostCents: 5 }]);
    expect(candidateBom({ positive: { device: 2, count: 1 }, negative: { device: 0, count: 1 } }, devices, null).unlinked).toEqual(['Loose']);
  });

  it("suggests the model's margin on the cost beyond the cheapest option, rounded up to 0.50", () => {
    // 40 ¢ more, price 199.00 on a cost of 50.00: 40 × 3.98 = 159.2 ¢ → 200 ¢.
    expect(suggestedSurchargeCents(60, 20, 19900, 5000)).toBe(200);
    expect(suggestedSurchargeCents(20, 20, 19900, 5000)).toBe(0);
    expect(suggestedSurchargeCents(10, 20, 19900, 5000)).toBe(0);
    // No known cost: the extra cost passed on as it is, rounded up.
    expect(suggestedSurchargeCents(120, 20, 19900, null)).toBe(100);
    expect(suggestedSurchargeCents(121, 20, 19900, null)).toBe(150);
  });
});
