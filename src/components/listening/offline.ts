// Renders a test tone through an option's preview chain in an OfflineAudioContext and reads its
// harmonics, so the browser's audio path can be checked against the engine.
import FFT from 'fft.js';
import type { CircuitSpec } from '../../../shared/engine';
import { buildChain } from './chain';
import { shaperCurve } from './shaper';

/** 1024 Hz at 65 536 Hz is exactly 64 samples a period: an FFT over whole periods needs no window. */
export const CHECK_SAMPLE_RATE = 65536;
export const CHECK_TONE_HZ = 1024;

/** Renders a full-scale sine (= the model's input peak) through the chain; returns the settled last 8192 samples. */
export async function renderToneOffline(spec: CircuitSpec, drive: number): Promise<Float32Array> {
  const seconds = 1;
  const ctx = new OfflineAudioContext(1, CHECK_SAMPLE_RATE * seconds, CHECK_SAMPLE_RATE);
  const buffer = ctx.createBuffer(1, CHECK_SAMPLE_RATE * seconds, CHECK_SAMPLE_RATE);
  const data = buffer.getChannelData(0);
  for (let n = 0; n < data.length; n++) data[n] = Math.sin((2 * Math.PI * CHECK_TONE_HZ * n) / CHECK_SAMPLE_RATE);
  const source = ctx.createBufferSource();
  source.buffer = buffer;
  const chain = buildChain(ctx, shaperCurve(spec, drive), 1);
  source.connect(chain.input);
  chain.output.connect(ctx.destination);
  source.start();
  const rendered = await ctx.startRendering();
  const all = rendered.getChannelData(0);
  return all.slice(all.length - 8192);
}

/** Peak amplitude of harmonics 1…count of a coherently sampled tone, via FFT (fft.js). */
export function harmonicPeaks(samples: Float32Array, samplesPerPeriod: number, count: number): number[] {
  const size = samples.length;
  const fft = new FFT(size);
  const spectrum = fft.createComplexArray();
  fft.realTransform(spectrum, Array.from(samples));
  const periods = size / samplesPerPeriod;
  const peaks: number[] = [];
  for (let k = 1; k <= count; k++) {
    const bin = k * periods;
    const re = spectrum[2 * bin];
    const im = spectrum[2 * bin + 1];
    peaks.push((2 * Math.hypot(re, im)) / size);
  }
  return peaks;
}
