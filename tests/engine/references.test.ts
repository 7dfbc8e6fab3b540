import { describe, it, expect } from 'vitest';
import {
  analyse, analyseOperatingPoint, binAmplitudes, periodicOutput, stageFromContract, validateContractInput,
} from '../../shared/engine/index';
import { RED_LED, SILICON, feedback, shunt, toDb } from './fixtures';

const none = (railPeakV: number, driveGain: number, inputPeakV = 1): Record<string, unknown> => ({
  toneHz: 1000, inputPeakV, driveGain, railPeakV, harmonics: 15, clipper: { topology: 'none' },
});

describe('square-wave limit (Fourier series of a square wave)', () => {
  const input = validateContractInput(none(1, 1e5));
  const samples = periodicOutput(stageFromContract(input), { samples: 8192 });
  const s = analyse(samples, 15);
  it('the rail clipper at extreme drive gives odd harmonics 4/(πk) and no even ones', () => {
    for (const h of s.harmonics) {
      // Square wave of amplitude L: b_k = 4L/(πk) for odd k, 0 for even k.
      if (h.order % 2 === 1) expect(Math.abs(toDb(h.peakV) - toDb(4 / (Math.PI * h.order)))).toBeLessThan(0.01);
      else expect(h.dbc).toBeLessThan(-120);
    }
  });
  it('THD over all orders tends to √(π²/8 − 1) (THD_F) and √(1 − 8/π²) (THD_R)', () => {
    const { peak } = binAmplitudes(samples);
    let all = 0;
    for (let k = 2; k < peak.length - 1; k++) all += peak[k] * peak[k];
    const thdF = Math.sqrt(all) / peak[1];
    const thdR = Math.sqrt(all) / Math.sqrt(all + peak[1] * peak[1]);
    // Fourier series of a square wave: THD_F = √(π²/8 − 1) ≈ 48.34 %, THD_R = √(1 − 8/π²) ≈ 43.52 %.
    expect(Math.abs(thdF / Math.sqrt((Math.PI ** 2) / 8 - 1) - 1)).toBeLessThan(2e-3);
    expect(Math.abs(thdR / Math.sqrt(1 - 8 / Math.PI ** 2) - 1)).toBeLessThan(2e-3);
    // Over 15 orders a square wave has THD_F = √(Σ_{odd k=3..15} 1/k²) = 0.4499.
    expect(s.thdF).toBeCloseTo(0.4499, 3);
  });
  it('a silicon-like diode pair approaches it only slowly, from below (engine.md: ≈ 0.43 at gain 10,000)', () => {
    // A textbook silicon junction (IS = 1e-14 A, N = 1, no RS): its logarithmic knee squares the wave only slowly.
    // (With a real diode's RS the ohmic drop at ~0.5 A rounds the wave again, as ngspice agrees.)
    const junction = { is: 1e-14, n: 1, rs: 0 };
    const at = (gain: number): number => analyseOperatingPoint(validateContractInput(
      shunt({ driveGain: gain, railPeakV: null, harmonics: 15 }, { positive: [junction], negative: [junction] }))).thdF;
    const square = 0.4499; // Fourier series of a square wave over 15 orders
    const t100 = at(100);
    const t1000 = at(1000);
    const t10000 = at(10000);
    expect(t100).toBeLessThan(t1000);
    expect(t1000).toBeLessThan(t10000);
    expect(t10000).toBeLessThan(square);
    expect(Math.abs(t10000 - 0.43)).toBeLessThan(0.01);
  });
});

describe('clipped sine (standard Fourier series of a clipped sinusoid)', () => {
  for (const ratio of [1.2, 2, 5]) {
    it(`the rail clipper with no diodes matches the coefficients to 0.01 dB (A/L = ${ratio})`, () => {
      const L = 2;
      const A = ratio * L;
      const s = analyse(periodicOutput(stageFromContract(validateContractInput(none(L, A))), { samples: 4096 }), 15);
      const th = Math.asin(L / A);
      // b1 = (2A/π)(θ + sinθ·cosθ)
      const b1 = ((2 * A) / Math.PI) * (th + Math.sin(th) * Math.cos(th));
      expect(Math.abs(toDb(s.fundamentalPeakV) - toDb(b1))).toBeLessThan(0.01);
      for (let k = 3; k <= 15; k += 2) {
        // odd k ≥ 3: |b_k| = |(2A/π)(sin((k−1)θ)/(k−1) − sin((k+1)θ)/(k+1)) + (4L/(πk))·cos(kθ)|
        const bk = Math.abs(((2 * A) / Math.PI) * (Math.sin((k - 1) * th) / (k - 1) - Math.sin((k + 1) * th) / (k + 1))
          + ((4 * L) / (Math.PI * k)) * Math.cos(k * th));
        if (bk / b1 < 1e-4) continue; // a near-null of the series: dB is meaningless there
        expect(Math.abs(toDb(s.harmonics[k - 1].peakV) - toDb(bk))).toBeLessThan(0.01);
      }
    });
  }
});

describe('half-wave symmetry theorem: symmetric networks have no even harmonics', () => {
  const cases: [string, Record<string, unknown>][] = [
    ['shunt pair', shunt()],
    ['shunt pair with capacitor', shunt({ driveGain: 80 }, { shuntFarads: 10e-9 })],
    ['feedback pair', feedback({ driveGain: 5 })],
    ['feedback LED pair with capacitor', feedback({ driveGain: 30 }, { feedbackFarads: 1e-9, positive: [RED_LED], negative: [RED_LED] })],
    ['two-and-two strings', shunt({ driveGain: 50 }, { positive: [SILICON, SILICON], negative: [SILICON, SILICON] })],
  ];
  for (const [name, json] of cases) {
    it(`${name}: even harmonics below −120 dBc`, () => {
      const s = analyseOperatingPoint(validateContractInput(json));
      for (const h of s.harmonics) if (h.order % 2 === 0) expect(h.dbc).toBeLessThan(-120);
      expect(Math.abs(s.dcV)).toBeLessThan(1e-6 * s.fundamentalPeakV);
    });
  }
});

describe('Parseval: harmonic powers plus DC equal the mean square of the samples', () => {
  for (const [name, json] of [
    ['asymmetric shunt', shunt({ driveGain: 60 }, { negative: [RED_LED] })],
    ['asymmetric feedback with capacitor', feedback({ driveGain: 10 }, { feedbackFarads: 2.2e-9, negative: [SILICON, SILICON] })],
  ] as const) {
    it(`${name}: within 1e-9 relative`, () => {
      const samples = periodicOutput(stageFromContract(validateContractInput(json)));
      const { peak } = binAmplitudes(samples);
      const half = samples.length / 2;
      let power = peak[0] ** 2 + peak[half] ** 2;
      for (let k = 1; k < half; k++) power += peak[k] ** 2 / 2;
      const meanSquare = samples.reduce((a, x) => a + x * x, 0) / samples.length;
      expect(Math.abs(power / meanSquare - 1)).toBeLessThan(1e-9);
    });
  }
});

describe('asymmetric and symmetric behaviour (product.md, common practice)', () => {
  const sweep = (clipper: Record<string, unknown>): ReturnType<typeof analyseOperatingPoint>[] =>
    [1, 1.5, 2, 3, 4, 6, 8, 12, 16, 24, 32, 48, 64, 100, 200, 400, 1000].map((g) =>
      analyseOperatingPoint(validateContractInput(shunt({ driveGain: g, railPeakV: null }, clipper))));
  it('silicon against a red LED: H2 > H3 at moderate distortion (THD 5–15 %) and a DC shift', () => {
    const points = sweep({ positive: [SILICON], negative: [RED_LED] });
    const moderate = points.filter((s) => s.thdF >= 0.05 && s.thdF <= 0.15);
    expect(moderate.length).toBeGreaterThan(0);
    for (const s of moderate) {
      expect(s.harmonics[1].peakV).toBeGreaterThan(s.harmonics[2].peakV);
      expect(Math.abs(s.dcV)).toBeGreaterThan(0.01 * s.fundamentalPeakV);
    }
    // At heavy drive the odd orders take over (towards a square wave).
    const heavy = points[points.length - 1];
    expect(heavy.harmonics[2].peakV).toBeGreaterThan(heavy.harmonics[1].peakV);
  });
  it('a symmetric pair stays odd-dominant at every drive', () => {
    for (const s of sweep({})) {
      if (s.thdF < 1e-4) continue;
      expect(s.oddEnergyShare).toBeGreaterThan(0.999999);
      expect(s.harmonics[2].peakV).toBeGreaterThan(s.harmonics[1].peakV);
    }
  });
});
