// The Web Audio chain one option plays through, shared by live playback and the offline check:
// waveshaper (4× oversampled, so the harmonics the curve makes do not fold back as aliases)
// → output coupling high-pass (blocks the DC an asymmetric clipper makes) → level-matching gain.

export interface OptionChain {
  input: AudioNode;
  shaper: WaveShaperNode;
  gain: GainNode;
  output: AudioNode;
}

export function buildChain(ctx: BaseAudioContext, curve: Float32Array, gain: number): OptionChain {
  const shaper = ctx.createWaveShaper();
  shaper.curve = curve as Float32Array<ArrayBuffer>;
  shaper.oversample = '4x';
  const coupling = ctx.createBiquadFilter();
  coupling.type = 'highpass';
  coupling.frequency.value = 15;
  coupling.Q.value = Math.SQRT1_2;
  const level = ctx.createGain();
  level.gain.value = gain;
  shaper.connect(coupling).connect(level);
  return { input: shaper, shaper, gain: level, output: level };
}
