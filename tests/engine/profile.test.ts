import { describe, it, expect } from 'vitest';
import {
  SolverError, analyseOperatingPoint, clippingOnset, computeProfile, driveSweep, forwardVoltage, gainAtDrive,
  monteCarlo, mulberry32, perUnitCircuit, railPeakFromSupply, taperFraction, transferCurve, validateContractInput,
  type CircuitSpec,
} from '../../shared/engine/index';
import { SILICON, feedback, shunt } from './fixtures';

const spec = (clipper: Record<string, unknown> = {}): CircuitSpec => ({
  clipper: { topology: 'shunt', seriesOhms: 2200, positive: [{ preset: 'si-small-signal' }], negative: [{ preset: 'si-small-signal' }], ...clipper },
  drive: { minGain: 1, maxGain: 200, taper: 'log', inputPeakV: 0.1, railPeakV: railPeakFromSupply(9) },
});

describe('drive stage', () => {
  it('tapers: linear is the rotation, audio is 10 % at mid-rotation', () => {
    expect(taperFraction(0.3, 'linear')).toBe(0.3);
    expect(taperFraction(0.5, 'log')).toBeCloseTo(0.1, 12);
    expect(taperFraction(1, 'log')).toBeCloseTo(1, 12);
    expect(gainAtDrive({ minGain: 1, maxGain: 101, taper: 'linear', inputPeakV: 0.1, railPeakV: null }, 0.5)).toBe(51);
    expect(railPeakFromSupply(9)).toBe(3);
    expect(railPeakFromSupply(18)).toBe(7.5);
  });
});

describe('harmonic profile', () => {
  it('sweeps 25 drive points with THD rising and an interpolated 1 % onset', () => {
    const p = computeProfile(spec());
    expect(p.sweep.length).toBe(25);
    expect(p.sweep[0].thdF).toBeLessThan(0.01);
    expect(p.sweep[24].thdF).toBeGreaterThan(0.2);
    for (const s of p.sweep) expect(s.harmonicsDbc.length).toBe(6);
    const onset = p.clippingOnsetDrive;
    expect(onset).not.toBeNull();
    // THD_F at the onset drive is 1 % to within the interpolation.
    const c = spec();
    const at = analyseOperatingPoint(validateContractInput({
      toneHz: 1000, inputPeakV: 0.1, driveGain: gainAtDrive(c.drive, onset!), railPeakV: c.drive.railPeakV, clipper: c.clipper,
    }));
    expect(at.thdF).toBeGreaterThan(0.008);
    expect(at.thdF).toBeLessThan(0.0125);
    expect(p.transfer).not.toBeNull();
    expect(p.reference.drive).toBe(0.5);
  });
  it('onset is null when THD never reaches 1 %', () => {
    expect(clippingOnset(driveSweep({ ...spec(), drive: { ...spec().drive, maxGain: 1.5 } }, 5))).toBeNull();
  });
  it('has no transfer curve with a capacitor, and the capacitor rounds the top harmonics', () => {
    const p = computeProfile(spec({ shuntFarads: 22e-9 }));
    expect(p.transfer).toBeNull();
    const plain = computeProfile(spec());
    expect(p.sweep[24].harmonicsDbc[5]).toBeLessThan(plain.sweep[24].harmonicsDbc[5]);
  });
  it('static transfer curve is odd for a symmetric pair and clamps near the diode Vf', () => {
    const t = transferCurve(spec(), { drive: 1, points: 41 });
    for (let i = 0; i < 41; i++) expect(t.outputV[i]).toBeCloseTo(-t.outputV[40 - i], 12);
    const top = t.outputV[40];
    expect(top).toBeGreaterThan(forwardVoltage(SILICON, 0.1e-3));
    expect(top).toBeLessThan(forwardVoltage(SILICON, 10e-3));
  });
});

describe('tolerance bands (Monte Carlo)', () => {
  it('is reproducible from its seed and orders P5 ≤ P50 ≤ P95', () => {
    const a = monteCarlo(spec({ negative: [{ preset: 'led-red' }] }), { draws: 60, seed: 42 });
    const b = monteCarlo(spec({ negative: [{ preset: 'led-red' }] }), { draws: 60, seed: 42 });
    const c = monteCarlo(spec({ negative: [{ preset: 'led-red' }] }), { draws: 60, seed: 43 });
    expect(a).toEqual(b);
    expect(c.thdF.p50).not.toBe(a.thdF.p50);
    for (const band of [a.thdF, a.h2Dbc, a.h3Dbc]) {
      expect(band.p5).toBeLessThanOrEqual(band.p50);
      expect(band.p50).toBeLessThanOrEqual(band.p95);
    }
    expect(a.thdF.p95).toBeGreaterThan(a.thdF.p5);
  });
  it('mulberry32 gives uniform values in [0, 1)', () => {
    const r = mulberry32(7);
    let sum = 0;
    for (let i = 0; i < 10000; i++) { const x = r(); expect(x).toBeGreaterThanOrEqual(0); expect(x).toBeLessThan(1); sum += x; }
    expect(sum / 10000).toBeCloseTo(0.5, 1);
  });
});

describe('per unit', () => {
  it('refits each device from its measured Vf and changes the profile accordingly', () => {
    const unit = perUnitCircuit(spec(), { positive: [0.62], negative: [0.56], testCurrentA: 1e-3 });
    expect(forwardVoltage(unit.network.positive[0], 1e-3)).toBeCloseTo(0.62, 10);
    expect(forwardVoltage(unit.network.negative[0], 1e-3)).toBeCloseTo(0.56, 10);
    expect(unit.network.positive[0].n).toBe(1.752);
    const p = computeProfile(unit, { sweepPoints: 5 });
    // Mismatched halves give even harmonics a matched pair lacks.
    expect(p.reference.spectrum.harmonics[1].dbc).toBeGreaterThan(-60);
  });
  it('needs one measurement per installed device', () => {
    expect(() => perUnitCircuit(spec(), { positive: [0.6, 0.6], negative: [0.6], testCurrentA: 1e-3 })).toThrow(/measured.positive must hold 1/);
  });
});

describe('solver robustness: converges over the whole valid range, never NaN', () => {
  const extremes: [string, Record<string, unknown>][] = [
    ['IS = 1e-20, N = 0.5', shunt({ driveGain: 1000, railPeakV: null }, { positive: [{ is: 1e-20, n: 0.5, rs: 0 }], negative: [{ is: 1e-20, n: 0.5, rs: 10 }] })],
    ['N = 10 strings', shunt({ driveGain: 100 }, { positive: [{ is: 1e-6, n: 10, rs: 100 }, { is: 1e-12, n: 3, rs: 0 }] })],
    ['gain 10,000 without rail', shunt({ driveGain: 10000, railPeakV: null })],
    ['gain 10,000 feedback with 1 µF', feedback({ driveGain: 10000 }, { feedbackFarads: 1e-6 })],
    ['1 µF shunt at 20 Hz', shunt({ toneHz: 20, driveGain: 50 }, { shuntFarads: 1e-6 })],
    ['one-sided network', shunt({ driveGain: 100 }, { negative: [] })],
    ['no devices', feedback({ driveGain: 2 }, { positive: [], negative: [], feedbackFarads: 1e-9 })],
    ['tiny signal', shunt({ inputPeakV: 1e-9, driveGain: 1 })],
  ];
  for (const [name, json] of extremes) {
    it(name, () => {
      const s = analyseOperatingPoint(validateContractInput(json));
      for (const x of [s.fundamentalPeakV, s.dcV, s.thdF, s.thdR, ...s.harmonics.map((h) => h.peakV)]) expect(Number.isFinite(x)).toBe(true);
      expect(s.fundamentalPeakV).toBeGreaterThan(0);
    });
  }
  it('reports a bad sampling request as a SolverError rather than NaN', () => {
    expect(() => analyseOperatingPoint(validateContractInput(shunt()), { samples: 1000 })).toThrow(SolverError);
  });
});
