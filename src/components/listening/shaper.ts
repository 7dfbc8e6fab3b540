// The clipping option as a waveshaping curve, from the engine's static transfer curve, and the
// level matching that keeps the louder option from sounding "better".
import { transferCurve, type CircuitSpec } from '../../../shared/engine';

/** Points in each waveshaper curve: fine enough that interpolation error stays far below 0.1 dB on H2/H3. */
export const CURVE_POINTS = 4097;

/** The circuit without capacitors: the static curve the preview can play (the capacitor's smoothing is not heard). */
export function withoutCapacitors(spec: CircuitSpec): { spec: CircuitSpec; dropped: boolean } {
  const clipper = { ...(spec.clipper as Record<string, unknown>) };
  const dropped = Number(clipper.shuntFarads ?? 0) > 0 || Number(clipper.feedbackFarads ?? 0) > 0;
  clipper.shuntFarads = 0;
  clipper.feedbackFarads = 0;
  return { spec: { ...spec, clipper }, dropped };
}

/**
 * A Web Audio waveshaper curve: input −1…1 stands for ∓ the model's input peak; the values are the
 * stage's output in volts (the gain node after it sets the listening level).
 */
export function shaperCurve(spec: CircuitSpec, drive: number): Float32Array {
  const { spec: staticSpec } = withoutCapacitors(spec);
  const curve = transferCurve(staticSpec, { drive, points: CURVE_POINTS, rangeV: staticSpec.drive.inputPeakV });
  return Float32Array.from(curve.outputV);
}

/** Applies a curve the way a WaveShaperNode does (linear interpolation, clamped ends), e.g. for level matching. */
export function applyCurve(curve: Float32Array, input: Float32Array): Float32Array {
  const out = new Float32Array(input.length);
  const last = curve.length - 1;
  for (let n = 0; n < input.length; n++) {
    const position = ((Math.max(-1, Math.min(1, input[n])) + 1) / 2) * last;
    const k = Math.min(last - 1, Math.floor(position));
    const f = position - k;
    out[n] = curve[k] + f * (curve[k + 1] - curve[k]);
  }
  return out;
}

/** RMS after removing the mean (the pedal's output capacitor blocks DC, so DC is not loudness). */
export function acRms(samples: Float32Array): number {
  let mean = 0;
  for (const v of samples) mean += v;
  mean /= samples.length;
  let sum = 0;
  for (const v of samples) sum += (v - mean) ** 2;
  return Math.sqrt(sum / samples.length);
}

export function peakAbs(samples: Float32Array): number {
  let peak = 0;
  for (const v of samples) peak = Math.max(peak, Math.abs(v));
  return peak;
}

/**
 * Gains that give every option the same RMS on the phrase, scaled together so that no option's
 * peak exceeds 0.9 of full scale. Returns one gain per curve.
 */
export function matchedGains(curves: Float32Array[], phrase: Float32Array, targetRms = 0.18): number[] {
  const shaped = curves.map((c) => applyCurve(c, phrase));
  const gains = shaped.map((s) => targetRms / Math.max(acRms(s), 1e-12));
  const loudestPeak = Math.max(...shaped.map((s, i) => peakAbs(s) * gains[i]));
  const safety = Math.min(1, 0.9 / loudestPeak);
  return gains.map((g) => g * safety);
}
