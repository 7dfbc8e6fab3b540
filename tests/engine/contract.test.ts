import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, it, expect } from 'vitest';
import {
  EngineInputError, computeOperatingPoint, errorBody, runContract, validateContractInput,
} from '../../shared/engine/index';
import { SILICON, feedback, shunt } from './fixtures';

function pathOf(json: unknown): string {
  try {
    validateContractInput(json);
  } catch (e) {
    expect(e).toBeInstanceOf(EngineInputError);
    return (e as EngineInputError).path;
  }
  throw new Error('expected a validation error');
}

describe('validation', () => {
  const cases: [string, unknown, string, RegExp][] = [
    ['zero IS', shunt({}, { positive: [{ ...SILICON, is: 0 }] }), 'clipper.positive[0].is', /> 0, got 0/],
    ['negative IS', shunt({}, { negative: [SILICON, { ...SILICON, is: -1e-9 }] }), 'clipper.negative[1].is', /got -1e-9/],
    ['N below 0.5', shunt({}, { positive: [{ ...SILICON, n: 0.4 }] }), 'clipper.positive[0].n', /≥ 0.5, got 0.4/],
    ['N above 10', shunt({}, { positive: [{ ...SILICON, n: 11 }] }), 'clipper.positive[0].n', /≤ 10, got 11/],
    ['negative RS', shunt({}, { positive: [{ ...SILICON, rs: -1 }] }), 'clipper.positive[0].rs', /≥ 0, got -1/],
    ['zero series resistance', shunt({}, { seriesOhms: 0 }), 'clipper.seriesOhms', /> 0, got 0/],
    ['negative feedback resistance', feedback({}, { feedbackOhms: -5 }), 'clipper.feedbackOhms', /got -5/],
    ['zero ground resistance', feedback({}, { groundOhms: 0 }), 'clipper.groundOhms', /> 0/],
    ['NaN gain', { ...shunt(), driveGain: NaN }, 'driveGain', /finite/],
    ['Infinity input', { ...shunt(), inputPeakV: Infinity }, 'inputPeakV', /finite/],
    ['string tone', { ...shunt(), toneHz: '1000' }, 'toneHz', /must be a number/],
    ['unknown topology', shunt({}, { topology: 'bridge' }), 'clipper.topology', /shunt, feedback, none, got the string "bridge"/],
    ['harmonics 0', { ...shunt(), harmonics: 0 }, 'harmonics', /≥ 1, got 0/],
    ['harmonics 51', { ...shunt(), harmonics: 51 }, 'harmonics', /≤ 50, got 51/],
    ['fractional harmonics', { ...shunt(), harmonics: 2.5 }, 'harmonics', /integer/],
    ['tone too low', { ...shunt(), toneHz: 19 }, 'toneHz', /≥ 20, got 19/],
    ['tone too high', { ...shunt(), toneHz: 20001 }, 'toneHz', /≤ 20000, got 20001/],
    ['capacitor too big', shunt({}, { shuntFarads: 2e-6 }), 'clipper.shuntFarads', /≤ 0.000001, got 0.000002/],
    ['negative capacitor', feedback({}, { feedbackFarads: -1e-9 }), 'clipper.feedbackFarads', /≥ 0/],
    ['zero rail', { ...shunt(), railPeakV: 0 }, 'railPeakV', /> 0/],
    ['missing clipper', { toneHz: 1000, inputPeakV: 0.1, driveGain: 2 }, 'clipper', /required/],
    ['device not an object', shunt({}, { positive: [3] }), 'clipper.positive[0]', /JSON object/],
    ['unknown preset', shunt({}, { positive: [{ preset: 'nope' }] }), 'clipper.positive[0].preset', /unknown preset/],
    ['not an object', [1, 2], '', /JSON object, got an array/],
  ];
  for (const [name, json, path, message] of cases) {
    it(`rejects ${name} at ${path || 'the root'}`, () => {
      expect(pathOf(json)).toBe(path);
      expect(() => validateContractInput(json)).toThrow(message);
    });
  }
  it('fills defaults and accepts presets', () => {
    const input = validateContractInput({ toneHz: 1000, inputPeakV: 0.1, driveGain: 2, clipper: { topology: 'shunt', seriesOhms: 1000, positive: [{ preset: 'led-red' }] } });
    expect(input.harmonics).toBe(10);
    expect(input.temperatureC).toBe(27);
    expect(input.railPeakV).toBeNull();
    expect(input.clipper.negative).toEqual([]);
    expect(input.clipper.positive[0].n).toBeGreaterThan(1);
  });
  it('error bodies carry message and path', () => {
    try { runContract({ ...shunt(), toneHz: 5 }); } catch (e) {
      expect(errorBody(e)).toEqual({ message: 'toneHz must be ≥ 20, got 5', path: 'toneHz' });
    }
  });
});

describe('contract output', () => {
  it('has exactly the contract fields, harmonics 1…k, finite numbers', () => {
    const out = computeOperatingPoint(validateContractInput({ ...shunt(), harmonics: 7 }));
    expect(Object.keys(out).sort()).toEqual(['dcV', 'fundamentalPeakV', 'harmonics', 'thdF', 'thdR']);
    expect(out.harmonics.map((h) => h.order)).toEqual([1, 2, 3, 4, 5, 6, 7]);
    expect(out.harmonics[0].dbc).toBe(0);
    for (const h of out.harmonics) expect(Object.keys(h).sort()).toEqual(['dbc', 'order', 'peakV']);
    expect(out.thdR).toBeLessThan(out.thdF);
    // THD_F and THD_R are tied: THD_R = THD_F / √(1 + THD_F²).
    expect(out.thdR).toBeCloseTo(out.thdF / Math.sqrt(1 + out.thdF ** 2), 12);
    expect(JSON.stringify(out)).not.toMatch(/null|NaN/);
  });
});

describe('CLI: npm run --silent profile -- FILE.json', () => {
  const dir = mkdtempSync(join(tmpdir(), 'kneepoint-cli-'));
  const run = (name: string, text: string | null): { status: number | null; json: Record<string, unknown> } => {
    const file = join(dir, name);
    if (text !== null) writeFileSync(file, text);
    const r = spawnSync('npm', ['run', '--silent', 'profile', '--', file], { encoding: 'utf8', cwd: process.cwd() });
    const lines = r.stdout.trim().split('\n');
    expect(lines.length).toBe(1);
    return { status: r.status, json: JSON.parse(lines[0]) };
  };
  it('prints one JSON object and exits 0 for a valid input', () => {
    const r = run('ok.json', JSON.stringify(shunt()));
    expect(r.status).toBe(0);
    expect(r.json.thdF).toBeGreaterThan(0.01);
    expect((r.json.harmonics as unknown[]).length).toBe(10);
  });
  it('exits 2 with {error: {message, path}} for an out-of-range field', () => {
    const r = run('bad.json', JSON.stringify(shunt({}, { positive: [{ ...SILICON, n: 20 }] })));
    expect(r.status).toBe(2);
    expect(r.json).toEqual({ error: { message: expect.stringMatching(/≤ 10, got 20/), path: 'clipper.positive[0].n' } });
  });
  it('exits 2 for bad JSON and for an unreadable file', () => {
    const bad = run('broken.json', '{"toneHz": ');
    expect(bad.status).toBe(2);
    expect((bad.json.error as { message: string }).message).toMatch(/not valid JSON/);
    const missing = run('missing.json', null);
    expect(missing.status).toBe(2);
    expect((missing.json.error as { path: string }).path).toBe('');
  });
});
