// A short guitar-like phrase synthesised with the Karplus–Strong plucked-string algorithm
// (K. Karplus and A. Strong, "Digital Synthesis of Plucked-String and Drum Timbres", 1983).
// Pure functions: no Web Audio here, so the same samples can be checked in Node.
import { mulberry32 } from '../../../shared/engine/random';

export interface Pluck {
  /** Fundamental frequency of the string, e.g. 82.41 Hz for a low E. */
  hz: number;
  /** Start time in seconds from the phrase's beginning. */
  at: number;
  /** Relative pick strength 0..1. */
  velocity: number;
}

/** A small riff: low strings, a power chord, a bend-free run — enough to hear the clipping's character. */
export const PHRASE: Pluck[] = [
  { hz: 82.41, at: 0.0, velocity: 1 }, // E2
  { hz: 82.41, at: 0.3, velocity: 0.7 },
  { hz: 98.0, at: 0.6, velocity: 0.9 }, // G2
  { hz: 110.0, at: 0.9, velocity: 0.9 }, // A2
  { hz: 82.41, at: 1.4, velocity: 1 }, // E2 + B2 + E3 power chord
  { hz: 123.47, at: 1.4, velocity: 0.8 },
  { hz: 164.81, at: 1.4, velocity: 0.7 },
  { hz: 146.83, at: 2.3, velocity: 0.8 }, // D3
  { hz: 196.0, at: 2.55, velocity: 0.8 }, // G3
  { hz: 246.94, at: 2.8, velocity: 0.9 }, // B3, left to ring
];
export const PHRASE_SECONDS = 4;

/** One plucked string of `seconds` length: a noise burst circulating in a delay line with a two-point average. */
export function pluck(hz: number, sampleRate: number, seconds: number, seed: number, decay = 0.996): Float32Array {
  const out = new Float32Array(Math.round(seconds * sampleRate));
  // The averaging filter adds half a sample of delay; the loop length is period − 0.5.
  const length = Math.max(2, Math.round(sampleRate / hz - 0.5));
  const line = new Float32Array(length);
  const next = mulberry32(seed);
  let previous = 0;
  for (let i = 0; i < length; i++) {
    // A gently low-passed burst sounds like a pick rather than a hiss.
    previous = 0.6 * (next() * 2 - 1) + 0.4 * previous;
    line[i] = previous;
  }
  let index = 0;
  for (let n = 0; n < out.length; n++) {
    const current = line[index];
    const following = line[(index + 1) % length];
    out[n] = current;
    line[index] = decay * 0.5 * (current + following);
    index = (index + 1) % length;
  }
  return out;
}

/** The whole phrase at a sample rate, peak-normalised to 1 (full scale = the model's input peak). */
export function synthesizePhrase(sampleRate: number, plucks: Pluck[] = PHRASE, seconds = PHRASE_SECONDS): Float32Array {
  const mix = new Float32Array(Math.round(seconds * sampleRate));
  plucks.forEach((p, i) => {
    const start = Math.round(p.at * sampleRate);
    const note = pluck(p.hz, sampleRate, seconds - p.at, 1000 + i);
    for (let n = 0; n < note.length && start + n < mix.length; n++) mix[start + n] += p.velocity * note[n];
  });
  let peak = 0;
  for (const v of mix) peak = Math.max(peak, Math.abs(v));
  // A short fade at the end avoids a click when the loop restarts.
  const fade = Math.round(0.05 * sampleRate);
  for (let n = 0; n < mix.length; n++) {
    const tail = Math.min(1, (mix.length - 1 - n) / fade);
    mix[n] = (mix[n] / peak) * tail;
  }
  return mix;
}
