import { describe, expect, it } from 'vitest';
import { computeOperatingPoint, gainAtDrive, resolveCircuit, staticTransfer, setupAtDrive, validateContractInput } from '../../shared/engine';
import { acRms, applyCurve, CURVE_POINTS, matchedGains, peakAbs, shaperCurve, withoutCapacitors } from '../../src/components/listening/shaper';
import { pluck, synthesizePhrase } from '../../src/components/listening/synth';
import { harmonicPeaks } from '../../src/components/listening/offline';
import { ASYMMETRIC_SILICON_LED_SHUNT, LED_FEEDBACK_WITH_CAP, SYMMETRIC_SILICON_SHUNT } from '../support/circuits';

const dbc = (h: number, h1: number) => 20 * Math.log10(h / h1);

/** Pitch by autocorrelation: the lag (with parabolic refinement) where the signal best matches itself. */
function pitchByAutocorrelation(samples: Float32Array, sampleRate: number, lowHz: number, highHz: number) {
  const segment = samples.subarray(Math.round(0.2 * sampleRate), Math.round(0.2 * sampleRate) + 8192);
  const corr = (lag: number) => {
    let sum = 0;
    for (let n = 0; n + lag < segment.length; n++) sum += segment[n] * segment[n + lag];
    return sum;
  };
  let best = Math.floor(sampleRate / highHz);
  for (let lag = best; lag <= Math.ceil(sampleRate / lowHz); lag++) if (corr(lag) > corr(best)) best = lag;
  const [a, b, c] = [corr(best - 1), corr(best), corr(best + 1)];
  const refined = best + (0.5 * (a - c)) / (a - 2 * b + c);
  return sampleRate / refined;
}

describe('plucked-string phrase', () => {
  it('tunes each string: Karplus–Strong loop of N + ½ samples sounds at fs / (N + ½) (Karplus & Strong 1983)', () => {
    for (const hz of [82.41, 110, 246.94]) {
      const f = pitchByAutocorrelation(pluck(hz, 48000, 1.5, 7), 48000, hz / 1.5, hz * 1.5);
      // The loop length rounds to a whole sample: at most half a sample of a 195-sample period.
      expect(Math.abs(f - hz) / hz).toBeLessThan(0.005);
    }
  });

  it('is peak-normalised to full scale, decays, and is the same every time', () => {
    const a = synthesizePhrase(24000);
    const b = synthesizePhrase(24000);
    expect(peakAbs(a)).toBeCloseTo(1, 6);
    expect(a).toEqual(b);
    expect(Math.abs(a[a.length - 1])).toBeLessThan(1e-3);
  });
});

describe('waveshaper curves from the engine', () => {
  it('are odd-symmetric for a symmetric pair and monotonic', () => {
    const c = shaperCurve(SYMMETRIC_SILICON_SHUNT, 0.6);
    expect(c.length).toBe(CURVE_POINTS);
    for (let i = 0; i < c.length; i++) expect(c[i] + c[c.length - 1 - i]).toBeCloseTo(0, 9);
    for (let i = 1; i < c.length; i++) expect(c[i]).toBeGreaterThanOrEqual(c[i - 1]);
  });

  it('clip further on the LED side of an asymmetric pair', () => {
    const c = shaperCurve(ASYMMETRIC_SILICON_LED_SHUNT, 0.8);
    expect(c[c.length - 1]).toBeGreaterThan(0.4);
    expect(-c[0]).toBeGreaterThan(1.4);
  });

  it('interpolate to the engine’s static transfer within 0.1 % of the output swing', () => {
    const curve = shaperCurve(ASYMMETRIC_SILICON_LED_SHUNT, 0.5);
    const circuit = resolveCircuit(ASYMMETRIC_SILICON_LED_SHUNT);
    const xs = Float32Array.from({ length: 200 }, (_, i) => -1 + (2 * (i + 0.37)) / 200);
    const exact = staticTransfer(setupAtDrive(circuit, 0.5), Array.from(xs, (x) => x * 0.1));
    const approx = applyCurve(curve, xs);
    const swing = curve[curve.length - 1] - curve[0];
    for (let i = 0; i < xs.length; i++) expect(Math.abs(approx[i] - exact[i])).toBeLessThan(1e-3 * swing);
  });

  it('drop a capacitor for the preview and say so', () => {
    expect(withoutCapacitors(LED_FEEDBACK_WITH_CAP).dropped).toBe(true);
    expect(withoutCapacitors(SYMMETRIC_SILICON_SHUNT).dropped).toBe(false);
    expect(() => shaperCurve(LED_FEEDBACK_WITH_CAP, 0.5)).not.toThrow();
  });

  it('reproduce the engine’s H2 and H3 on a coherent sine within 0.1 dB', () => {
    const drive = 0.5;
    const curve = shaperCurve(ASYMMETRIC_SILICON_LED_SHUNT, drive);
    const sine = Float32Array.from({ length: 8192 }, (_, n) => Math.sin((2 * Math.PI * n) / 64));
    const peaks = harmonicPeaks(applyCurve(curve, sine), 64, 3);
    const circuit = resolveCircuit(ASYMMETRIC_SILICON_LED_SHUNT);
    const engine = computeOperatingPoint(validateContractInput({
      toneHz: 1000, inputPeakV: 0.1, driveGain: gainAtDrive(circuit.drive, drive), railPeakV: 7.5,
      clipper: (ASYMMETRIC_SILICON_LED_SHUNT.clipper as object), harmonics: 3,
    }));
    expect(Math.abs(dbc(peaks[1], peaks[0]) - engine.harmonics[1].dbc)).toBeLessThan(0.1);
    expect(Math.abs(dbc(peaks[2], peaks[0]) - engine.harmonics[2].dbc)).toBeLessThan(0.1);
  });
});

describe('level matching', () => {
  it('gives every option the same RMS on the phrase and keeps peaks below 0.9', () => {
    const phrase = synthesizePhrase(24000);
    const curves = [SYMMETRIC_SILICON_SHUNT, ASYMMETRIC_SILICON_LED_SHUNT, LED_FEEDBACK_WITH_CAP].map((c) => shaperCurve(c, 0.7));
    const gains = matchedGains(curves, phrase);
    const levels = curves.map((c, i) => acRms(applyCurve(c, phrase)) * gains[i]);
    for (const l of levels) expect(20 * Math.log10(l / levels[0])).toBeCloseTo(0, 2);
    for (let i = 0; i < curves.length; i++) expect(peakAbs(applyCurve(curves[i], phrase)) * gains[i]).toBeLessThanOrEqual(0.9 + 1e-9);
    // Unmatched, the options differ by several dB (LED pairs clip later and play louder).
    const raw = curves.map((c) => acRms(applyCurve(c, phrase)));
    expect(Math.abs(20 * Math.log10(raw[2] / raw[0]))).toBeGreaterThan(3);
  });
});
