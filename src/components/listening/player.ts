// Live playback: the phrase loops through every option's chain at once, and a crossfade picks
// which one is heard, so switching A/B is instant and seamless.
import { buildChain, type OptionChain } from './chain';
import { synthesizePhrase } from './synth';

const CROSSFADE_SECONDS = 0.03;

export class PreviewPlayer {
  private ctx: AudioContext | null = null;
  private source: AudioBufferSourceNode | null = null;
  private chains: OptionChain[] = [];
  private selectors: GainNode[] = [];
  private analyser: AnalyserNode | null = null;
  private phrase: Float32Array | null = null;
  private readonly scratch = new Float32Array(2048);

  /** The phrase at the context's sample rate (for level matching with the same samples that play). */
  phraseSamples(): Float32Array {
    if (!this.phrase) this.phrase = synthesizePhrase(this.ctx?.sampleRate ?? 48000);
    return this.phrase;
  }

  get playing() {
    return this.source !== null;
  }

  /** Must be called from a user gesture (browsers only start audio then). */
  async start(curves: Float32Array[], gains: number[], selected: number) {
    this.stop();
    this.ctx ??= new AudioContext();
    await this.ctx.resume();
    const ctx = this.ctx;
    this.phrase = synthesizePhrase(ctx.sampleRate);
    const buffer = ctx.createBuffer(1, this.phrase.length, ctx.sampleRate);
    buffer.copyToChannel(this.phrase as Float32Array<ArrayBuffer>, 0);
    this.analyser = ctx.createAnalyser();
    this.analyser.fftSize = 2048;
    this.analyser.connect(ctx.destination);
    const source = ctx.createBufferSource();
    source.buffer = buffer;
    source.loop = true;
    this.chains = curves.map((curve, i) => buildChain(ctx, curve, gains[i]));
    this.selectors = this.chains.map((chain, i) => {
      const selector = ctx.createGain();
      selector.gain.value = i === selected ? 1 : 0;
      source.connect(chain.input);
      chain.output.connect(selector).connect(this.analyser!);
      return selector;
    });
    source.start();
    this.source = source;
  }

  /** Swaps in new curves and gains while playing (the drive control moved). */
  update(curves: Float32Array[], gains: number[]) {
    this.chains.forEach((chain, i) => {
      if (!curves[i]) return;
      chain.shaper.curve = curves[i] as Float32Array<ArrayBuffer>;
      chain.gain.gain.setTargetAtTime(gains[i], this.ctx!.currentTime, 0.01);
    });
  }

  select(index: number) {
    if (!this.ctx) return;
    const now = this.ctx.currentTime;
    this.selectors.forEach((selector, i) => {
      selector.gain.cancelScheduledValues(now);
      selector.gain.setTargetAtTime(i === index ? 1 : 0, now, CROSSFADE_SECONDS / 3);
    });
  }

  /** RMS of what is being heard now, 0…1 full scale. */
  level(): number {
    if (!this.analyser || !this.source) return 0;
    this.analyser.getFloatTimeDomainData(this.scratch);
    let sum = 0;
    for (const v of this.scratch) sum += v * v;
    return Math.sqrt(sum / this.scratch.length);
  }

  stop() {
    this.source?.stop();
    this.source?.disconnect();
    this.source = null;
    for (const chain of this.chains) chain.output.disconnect();
    this.chains = [];
    this.selectors = [];
  }

  async close() {
    this.stop();
    await this.ctx?.close();
    this.ctx = null;
  }
}
