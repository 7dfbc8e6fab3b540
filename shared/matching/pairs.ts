// The matching contract (`npm run --silent match -- FILE.json`) and the pairing the product uses for
// symmetric options with one device a side: both call matchPairs.
//   input:  {"readings": [{"id": "T1-01", "vf": 0.5981}, …], "pairs": K, "objective": "sum" | "max", "maxDeltaMv"?: m}
//   output: {"pairs": [{"a", "b", "deltaMv"}, …], "totalDeltaMv", "worstDeltaMv", "unused": [ids]}
// Exact: see the exchange argument in groups.ts.
import { EngineInputError } from '../engine/errors';
import { chooseBlocks, type MatchObjective } from './groups';

export type { MatchObjective };

export interface Reading { id: string; vf: number }
export interface MatchInput { readings: Reading[]; pairs: number; objective: MatchObjective; maxDeltaMv?: number }
export interface MatchedPair { a: string; b: string; deltaMv: number }
export interface MatchOutput { pairs: MatchedPair[]; totalDeltaMv: number; worstDeltaMv: number; unused: string[] }

/** Millivolts kept to 0.1 µV, so 0.6003 − 0.5999 prints 0.4, not 0.40000000000000036. */
export const roundMv = (mv: number) => Math.round(mv * 1e4) / 1e4;

/** Checks the contract's input; throws EngineInputError {path, message} (exit code 2 from the CLI). */
export function validateMatchInput(json: unknown): MatchInput {
  if (typeof json !== 'object' || json === null || Array.isArray(json)) throw new EngineInputError('', 'The input must be a JSON object');
  const o = json as Record<string, unknown>;
  if (!Array.isArray(o.readings)) throw new EngineInputError('readings', 'readings must be an array of {id, vf}');
  if (o.readings.length > 100_000) throw new EngineInputError('readings', `readings may hold at most 100000 entries, got ${o.readings.length}`);
  const seen = new Set<string>();
  const readings = o.readings.map((r: unknown, i: number): Reading => {
    const p = `readings[${i}]`;
    if (typeof r !== 'object' || r === null) throw new EngineInputError(p, `${p} must be an object {id, vf}`);
    const { id, vf } = r as Record<string, unknown>;
    if (typeof id !== 'string' || id.length === 0 || id.length > 80) throw new EngineInputError(`${p}.id`, `${p}.id must be a text of 1–80 characters`);
    if (seen.has(id)) throw new EngineInputError(`${p}.id`, `${p}.id "${id}" appears twice: ids must be unique`);
    seen.add(id);
    if (vf === undefined || vf === null) throw new EngineInputError(`${p}.vf`, `${p}.vf is required (volts)`);
    if (typeof vf !== 'number' || !Number.isFinite(vf)) throw new EngineInputError(`${p}.vf`, `${p}.vf must be a number of volts, got ${JSON.stringify(vf)}`);
    if (vf <= 0 || vf > 10) throw new EngineInputError(`${p}.vf`, `${p}.vf must be above 0 V and at most 10 V, got ${vf}`);
    return { id, vf };
  });
  const k = o.pairs;
  if (typeof k !== 'number' || !Number.isInteger(k) || k < 1) throw new EngineInputError('pairs', `pairs must be a whole number ≥ 1, got ${JSON.stringify(k)}`);
  const objective = o.objective ?? 'sum';
  if (objective !== 'sum' && objective !== 'max') throw new EngineInputError('objective', `objective must be "sum" or "max", got ${JSON.stringify(o.objective)}`);
  const m = o.maxDeltaMv;
  if (m !== undefined && (typeof m !== 'number' || !Number.isFinite(m) || m < 0)) {
    throw new EngineInputError('maxDeltaMv', `maxDeltaMv must be a number of millivolts ≥ 0, got ${JSON.stringify(m)}`);
  }
  return { readings, pairs: k, objective, maxDeltaMv: m as number | undefined };
}

/** Sorted by Vf, ties by id, so every run gives the same answer. */
export function sortReadings<T extends Reading>(readings: readonly T[]): T[] {
  return [...readings].sort((x, y) => x.vf - y.vf || (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
}

/**
 * K disjoint pairs by the objective (exact): e.g. readings 0.600, 0.6004, 0.610, 0.6101 with K = 2
 * → pairs (0.600, 0.6004) and (0.610, 0.6101), total 0.5 mV. Fewer than K when there are too few
 * readings or the cap forbids more.
 */
export function matchPairs(input: MatchInput): MatchOutput {
  const sorted = sortReadings(input.readings);
  const vf = sorted.map((r) => r.vf);
  // The cap in volts, widened by a rounding hair so a pair of exactly maxDeltaMv is allowed.
  const cap = input.maxDeltaMv === undefined ? Infinity : input.maxDeltaMv / 1000 + 1e-12;
  const { starts } = chooseBlocks(vf, 2, input.pairs, input.objective, cap);
  const used = new Set<number>();
  const pairs = starts.map((s) => {
    used.add(s); used.add(s + 1);
    return { a: sorted[s].id, b: sorted[s + 1].id, deltaMv: roundMv((vf[s + 1] - vf[s]) * 1000) };
  });
  const total = starts.reduce((t, s) => t + (vf[s + 1] - vf[s]) * 1000, 0);
  return {
    pairs,
    totalDeltaMv: roundMv(total),
    worstDeltaMv: pairs.reduce((w, p) => Math.max(w, p.deltaMv), 0),
    unused: sorted.filter((_, i) => !used.has(i)).map((r) => r.id),
  };
}

/** Validate then match: what the CLI runs. */
export function runMatch(json: unknown): MatchOutput {
  return matchPairs(validateMatchInput(json));
}
