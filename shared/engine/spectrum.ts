// Harmonic analysis of one coherently sampled period: no window is needed, each harmonic sits in its own bin.
import FFT from 'fft.js';
import { EngineInputError, checkRange } from './errors';
import type { Decibels, Ratio, Volts } from './units';

/** Floor for dBc of an exactly zero harmonic, so the value stays a finite JSON number: −400 dBc. */
export const DBC_FLOOR: Decibels = -400;

/** One harmonic: order k, peak amplitude, level relative to the fundamental, and sine phase in degrees. */
export interface Harmonic {
  order: number;
  peakV: Volts;
  dbc: Decibels;
  /** Phase φ of peakV·sin(k·ωt + φ) relative to the input sine, degrees in (−180, 180]. */
  phaseDeg: number;
}

/** The spectrum of a period, e.g. {dcV: −0.35, fundamentalPeakV: 1.26, thdF: 0.26, thdR: 0.25, …}. */
export interface Spectrum {
  dcV: Volts;
  fundamentalPeakV: Volts;
  harmonics: Harmonic[];
  /** THD_F = √(Σ_{k≥2} V_k²) / V_1, over the orders reported. */
  thdF: Ratio;
  /** THD_R = √(Σ_{k≥2} V_k²) / √(Σ_{k≥1} V_k²), over the orders reported. */
  thdR: Ratio;
  /** Share of the distortion energy (orders 2…K) in even orders, 0..1; odd = 1 − even. */
  evenEnergyShare: Ratio;
  oddEnergyShare: Ratio;
  /** RMS of the sampled output including DC. */
  rmsV: Volts;
  /** Peak |output| over RMS, e.g. √2 for a pure sine. */
  crestFactor: Ratio;
  /** Peak of |output|. */
  peakV: Volts;
}

const transforms = new Map<number, FFT>();

function transformFor(n: number): FFT {
  let f = transforms.get(n);
  if (!f) {
    f = new FFT(n);
    transforms.set(n, f);
  }
  return f;
}

/**
 * Peak amplitude and complex bin of every frequency 0..N/2 of one period (the raw DFT via fft.js),
 * e.g. binAmplitudes(sine).peak[1] = 1. peak[0] is the DC value, peak[N/2] the Nyquist value.
 */
export function binAmplitudes(samples: ArrayLike<number>): { peak: Float64Array; re: Float64Array; im: Float64Array } {
  const n = samples.length;
  if (n < 4 || (n & (n - 1)) !== 0) throw new EngineInputError('samples', `samples must be a power of two ≥ 4, got ${n}`);
  const f = transformFor(n);
  const out = f.createComplexArray() as number[];
  f.realTransform(out, Array.from(samples));
  const half = n / 2;
  const peak = new Float64Array(half + 1);
  const re = new Float64Array(half + 1);
  const im = new Float64Array(half + 1);
  for (let k = 0; k <= half; k++) {
    re[k] = out[2 * k]; im[k] = out[2 * k + 1];
    const mag = Math.hypot(re[k], im[k]);
    peak[k] = k === 0 || k === half ? re[k] / n : (2 * mag) / n;
  }
  return { peak, re, im };
}

/** Harmonic analysis of one period with orders 1…harmonics, e.g. analyse(squareWave, 15).thdF ≈ 0.45. */
export function analyse(samples: ArrayLike<number>, harmonics: number): Spectrum {
  checkRange(harmonics, 1, 50, 'harmonics');
  if (!Number.isInteger(harmonics)) throw new EngineInputError('harmonics', `harmonics must be an integer, got ${harmonics}`);
  const n = samples.length;
  if (harmonics >= n / 2) throw new EngineInputError('harmonics', `harmonics must be < ${n / 2} for ${n} samples, got ${harmonics}`);
  const { peak, re, im } = binAmplitudes(samples);
  const v1 = peak[1];
  const list: Harmonic[] = [];
  let distortion = 0;
  let even = 0;
  for (let k = 1; k <= harmonics; k++) {
    const p = peak[k];
    const ratio = v1 > 0 ? p / v1 : 0;
    const dbc = k === 1 ? 0 : ratio > 0 ? Math.max(DBC_FLOOR, 20 * Math.log10(ratio)) : DBC_FLOOR;
    let phase = (Math.atan2(re[k], -im[k]) * 180) / Math.PI;
    if (phase <= -180) phase += 360;
    list.push({ order: k, peakV: p, dbc, phaseDeg: phase });
    if (k >= 2) {
      distortion += p * p;
      if (k % 2 === 0) even += p * p;
    }
  }
  let sumSquares = 0;
  let top = 0;
  for (let i = 0; i < n; i++) {
    const x = samples[i];
    sumSquares += x * x;
    if (Math.abs(x) > top) top = Math.abs(x);
  }
  const rms = Math.sqrt(sumSquares / n);
  return {
    dcV: peak[0],
    fundamentalPeakV: v1,
    harmonics: list,
    thdF: v1 > 0 ? Math.sqrt(distortion) / v1 : 0,
    thdR: Math.sqrt(distortion + v1 * v1) > 0 ? Math.sqrt(distortion) / Math.sqrt(distortion + v1 * v1) : 0,
    evenEnergyShare: distortion > 0 ? even / distortion : 0,
    oddEnergyShare: distortion > 0 ? 1 - even / distortion : 0,
    rmsV: rms,
    crestFactor: rms > 0 ? top / rms : 0,
    peakV: top,
  };
}
