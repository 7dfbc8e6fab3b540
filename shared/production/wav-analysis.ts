// Harmonic analysis of a bench capture of a test tone. Captures are not coherent (the tone does
// not fit a whole number of periods into the record), so the record is shaped with a 4-term
// Blackman–Harris window (F. J. Harris, "On the use of windows for harmonic analysis with the
// discrete Fourier transform", Proc. IEEE 66(1), 1978; sidelobes below −92 dB) and each
// harmonic's amplitude is read from the energy in its main lobe (±4 bins), which does not
// depend on where the tone falls between bins (Parseval over the lobe).
import FFT from 'fft.js';

const BH4 = [0.35875, 0.48829, 0.14128, 0.01168];
const LOBE_BINS = 4;

export interface CaptureHarmonic {
  order: number;
  frequencyHz: number;
  amplitude: number;
  dbc: number;
}

export interface CaptureAnalysis {
  sampleRate: number;
  samplesAnalysed: number;
  fundamentalHz: number;
  harmonics: CaptureHarmonic[];
  /** THD_F = √(Σ_{k≥2} A_k²) / A_1, over the harmonics found below Nyquist. */
  thdPercent: number;
}

function largestPowerOfTwo(n: number) {
  let p = 1;
  while (p * 2 <= n) p *= 2;
  return p;
}

/** Analyse a mono capture, e.g. analyseCapture(samples, 48000).fundamentalHz ≈ 1000. */
export function analyseCapture(samples: ArrayLike<number>, sampleRate: number, options: { harmonics?: number; minHz?: number; maxHz?: number } = {}): CaptureAnalysis {
  const size = largestPowerOfTwo(Math.min(samples.length, 1 << 17));
  if (size < 4096) throw new RangeError(`the capture needs at least 4096 samples, got ${samples.length}`);
  const offset = Math.floor((samples.length - size) / 2); // the middle of the record, away from fades
  let mean = 0;
  for (let i = 0; i < size; i++) mean += samples[offset + i];
  mean /= size;
  const input = new Array<number>(size);
  for (let i = 0; i < size; i++) {
    const x = (2 * Math.PI * i) / (size - 1);
    const w = BH4[0] - BH4[1] * Math.cos(x) + BH4[2] * Math.cos(2 * x) - BH4[3] * Math.cos(3 * x);
    input[i] = (samples[offset + i] - mean) * w;
  }
  const fft = new FFT(size);
  const out = fft.createComplexArray() as number[];
  fft.realTransform(out, input);
  const half = size / 2;
  const power = new Float64Array(half);
  for (let k = 0; k < half; k++) power[k] = out[2 * k] ** 2 + out[2 * k + 1] ** 2;
  const binHz = sampleRate / size;

  const minBin = Math.max(LOBE_BINS + 1, Math.ceil((options.minHz ?? 20) / binHz));
  const maxBin = Math.min(half - LOBE_BINS - 1, Math.floor((options.maxHz ?? 20000) / binHz));
  let peak = minBin;
  for (let k = minBin; k <= maxBin; k++) if (power[k] > power[peak]) peak = k;
  if (power[peak] === 0) throw new RangeError('the capture is silent: no tone found');

  const lobe = (centre: number) => {
    let energy = 0;
    let moment = 0;
    for (let k = Math.max(1, centre - LOBE_BINS); k <= Math.min(half - 1, centre + LOBE_BINS); k++) {
      energy += power[k];
      moment += k * power[k];
    }
    return { energy, centre: energy > 0 ? moment / energy : centre };
  };
  // The window is symmetric, so the power-weighted centre of the lobe is the tone's frequency.
  const fundamental = lobe(peak);
  const f0Bin = fundamental.centre;
  const count = options.harmonics ?? 10;
  const harmonics: CaptureHarmonic[] = [];
  const a1 = Math.sqrt(fundamental.energy);
  for (let order = 1; order <= count; order++) {
    const centre = Math.round(order * f0Bin);
    if (centre + LOBE_BINS >= half) break;
    // Amplitude from lobe energy: Σ|X|² ≈ (A²/4)·N·Σw², so A ∝ √energy; report relative to the window's gain.
    const { energy } = order === 1 ? fundamental : lobe(centre);
    const amplitude = Math.sqrt(energy);
    harmonics.push({ order, frequencyHz: order * f0Bin * binHz, amplitude, dbc: order === 1 ? 0 : 20 * Math.log10(Math.max(amplitude, 1e-300) / a1) });
  }
  const scale = windowAmplitudeScale(size);
  for (const h of harmonics) h.amplitude *= scale;
  const sumSquares = harmonics.slice(1).reduce((s, h) => s + h.amplitude ** 2, 0);
  return {
    sampleRate,
    samplesAnalysed: size,
    fundamentalHz: f0Bin * binHz,
    harmonics,
    thdPercent: (100 * Math.sqrt(sumSquares)) / harmonics[0].amplitude,
  };
}

/** From √(lobe energy) to peak amplitude: A = 2·√(energy / (N·Σw²)). */
function windowAmplitudeScale(size: number) {
  let sumW2 = 0;
  for (let i = 0; i < size; i++) {
    const x = (2 * Math.PI * i) / (size - 1);
    sumW2 += (BH4[0] - BH4[1] * Math.cos(x) + BH4[2] * Math.cos(2 * x) - BH4[3] * Math.cos(3 * x)) ** 2;
  }
  return 2 / Math.sqrt(size * sumW2);
}
