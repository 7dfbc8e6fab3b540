// Builds the preview's waveshaper curves and matched gains off the main thread: the phrase, a
// 4097-point transfer curve per option and the level matching take tens of ms (far more on a cold start).
import type { CircuitSpec } from '../../../shared/engine';
import { matchedGains, shaperCurve } from './shaper';
import { synthesizePhrase } from './synth';

export interface CurvesRequest { id: number; circuits: CircuitSpec[]; drive: number }
export type CurvesResponse = { id: number; curves: Float32Array[]; gains: number[] } | { id: number; error: string };

let phrase: Float32Array | null = null;

self.onmessage = (e: MessageEvent<CurvesRequest>) => {
  const { id, circuits, drive } = e.data;
  try {
    phrase ??= synthesizePhrase(24000);
    const curves = circuits.map((c) => shaperCurve(c, drive));
    const gains = matchedGains(curves, phrase);
    self.postMessage({ id, curves, gains } satisfies CurvesResponse, { transfer: curves.map((c) => c.buffer) });
  } catch (err) {
    self.postMessage({ id, error: err instanceof Error ? err.message : String(err) } satisfies CurvesResponse);
  }
};
