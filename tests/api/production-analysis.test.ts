import { describe, expect, it } from 'vitest';
import { analyseCapture } from '../../shared/production/wav-analysis';
import { assessPlan, proposePlan, addWorkingDays } from '../../shared/production/schedule';
import { unitSerial } from '../../shared/production/serials';
import { isVfOutOfRange } from '../../shared/production/forward-voltage';

// Synthesized captures with exactly known harmonic content: sums of sines at f, 2f, 3f … with
// stated amplitudes, so THD_F = √(Σ_{k≥2} A_k²)/A_1 is known in closed form (definition of THD_F).
function capture(f: number, amplitudes: number[], sampleRate: number, seconds: number, noiseRms = 0, seed = 7) {
  const n = Math.round(seconds * sampleRate);
  const out = new Float64Array(n);
  let s = seed;
  const uniform = () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
  for (let i = 0; i < n; i++) {
    let x = 0;
    amplitudes.forEach((a, k) => { x += a * Math.sin(2 * Math.PI * (k + 1) * f * (i / sampleRate) + 0.7 * k); });
    // Gaussian noise by Box–Muller.
    if (noiseRms) x += noiseRms * Math.sqrt(-2 * Math.log(uniform() + 1e-12)) * Math.cos(2 * Math.PI * uniform());
    out[i] = x;
  }
  return out;
}
const thdOf = (a: number[]) => (100 * Math.sqrt(a.slice(1).reduce((s, x) => s + x * x, 0))) / a[0];

describe('capture analysis', () => {
  it('finds the fundamental and harmonics of a non-coherent capture (non-integer number of periods)', () => {
    const amps = [0.8, 0.08, 0.04, 0.01, 0.005];
    // 997.3 Hz for 0.4137 s at 48 kHz: 412.58… periods, no bin lines up with a harmonic.
    const r = analyseCapture(capture(997.3, amps, 48000, 0.4137), 48000);
    expect(r.fundamentalHz).toBeCloseTo(997.3, 1);
    expect(r.thdPercent).toBeCloseTo(thdOf(amps), 2);
    expect(r.harmonics[1].dbc).toBeCloseTo(20 * Math.log10(0.1), 1);
    expect(r.harmonics[2].dbc).toBeCloseTo(20 * Math.log10(0.05), 1);
    expect(r.harmonics[0].amplitude).toBeCloseTo(0.8, 3);
  });

  it('stays accurate with added noise and at 44.1 and 96 kHz', () => {
    const amps = [1, 0.02, 0.15];
    for (const rate of [44100, 96000]) {
      const r = analyseCapture(capture(1000.7, amps, rate, 0.7777, 1e-3), rate);
      expect(r.fundamentalHz).toBeCloseTo(1000.7, 0);
      expect(Math.abs(r.thdPercent - thdOf(amps)) / thdOf(amps)).toBeLessThan(0.01);
    }
  });

  it('reads a pure tone as nearly no distortion, and refuses silence and short records', () => {
    expect(analyseCapture(capture(1000, [0.5], 48000, 0.5), 48000).thdPercent).toBeLessThan(0.01);
    expect(() => analyseCapture(new Float64Array(48000), 48000)).toThrow(/silent/);
    expect(() => analyseCapture(new Float64Array(1000), 48000)).toThrow(/at least 4096/);
  });
});

describe('LPT plan', () => {
  const people = [
    { id: 1, name: 'A', skills: ['th', 'dm'], dailyCapacityMinutes: 240 },
    { id: 2, name: 'B', skills: ['th'], dailyCapacityMinutes: 480 },
  ];
  it('gives each build to a qualified assembler, within daily capacity, earliest due first', () => {
    const jobs = [
      { unitId: 1, minutes: 120, skills: ['th', 'dm'], dueDate: null },
      { unitId: 2, minutes: 120, skills: ['th'], dueDate: '2027-01-05' },
      { unitId: 3, minutes: 200, skills: ['th'], dueDate: '2027-01-04' },
      { unitId: 4, minutes: 120, skills: ['th', 'dm'], dueDate: '2027-01-04' },
    ];
    const plan = proposePlan(jobs, people, '2027-01-04');
    const by = new Map(plan.builds.map((b) => [b.unitId, b]));
    expect(by.get(1)!.assemblerId).toBe(1); // only A has device matching
    expect(by.get(4)!.assemblerId).toBe(1);
    expect(by.get(3)!.assemblerId).toBe(2);
    expect(plan.load.every((l) => !l.overloaded)).toBe(true);
    expect(plan.unassignable).toEqual([]);
  });

  it('flags overloaded days and missed due dates in an edited plan, and units nobody can build', () => {
    const jobs = [{ unitId: 1, minutes: 200, skills: ['th'], dueDate: '2027-01-04' }, { unitId: 2, minutes: 100, skills: ['th'], dueDate: null }];
    const edited = assessPlan([{ unitId: 1, assemblerId: 1, date: '2027-01-05' }, { unitId: 2, assemblerId: 1, date: '2027-01-05' }], jobs, people);
    expect(edited.load[0]).toMatchObject({ minutes: 300, capacityMinutes: 240, overloaded: true });
    expect(edited.late).toEqual([1]);
    expect(proposePlan([{ unitId: 9, minutes: 10, skills: ['smd'], dueDate: null }], people, '2027-01-04').unassignable).toEqual([9]);
  });

  it('skips weekends', () => {
    expect(addWorkingDays('2027-01-08', 1)).toBe('2027-01-11'); // Friday → Monday
  });
});

describe('serials and forward-voltage ranges', () => {
  it('builds serials from prefix, batch and sequence, with a check letter', () => {
    expect(unitSerial('HM', 7, 12)).toMatch(/^HM-B0007-012[A-Z]$/);
    expect(unitSerial('HM', 7, 12)).not.toBe(unitSerial('HM', 7, 21));
  });
  it('flags Vf outside the kind’s range (common practice, product brief)', () => {
    expect(isVfOutOfRange('silicon', 0.62)).toBe(false);
    expect(isVfOutOfRange('silicon', 1.8)).toBe(true);
    expect(isVfOutOfRange('led', 1.8)).toBe(false);
    expect(isVfOutOfRange('germanium', 0.6)).toBe(true);
  });
});
