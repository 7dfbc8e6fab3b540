// Engine-costed cross pairing for asymmetric options: one side's device from one tray, the other
// side's from another, each pair judged by the engine-predicted second harmonic at the option's
// reference drive, against the option's nominal H2 (the same circuit with nominal devices).
//
// Cost of a pair = |H2(pair) − H2(nominal)| in dB. A 60 × 60 matrix would take 3,600 engine solves
// (~3 ms each here), so above GRID_STEPS² pairs the cost is read from a GRID_STEPS × GRID_STEPS grid
// of engine solves over the two sides' Vf ranges, bilinearly interpolated (H2 in dB is smooth in
// Vf over a tray's spread; tests/engine/matching.test.ts checks the interpolation against direct
// solves). The assignment on that cost is exact (Hungarian method, assignment.ts); the chosen
// pairs are then solved directly, so the figures shown are the engine's own.
import { analyse, DRAW_SAMPLING, perUnitCircuit, periodicOutput, setupAtDrive, type Circuit } from '../engine/index';
import { minCostAssignment } from './assignment';
import type { Reading } from './pairs';

/** H2 below this reads as this (a perfectly matched pair has none at all). */
export const H2_FLOOR_DBC = -120;
/** Grid points per axis when the cost matrix is bigger than a grid. */
export const GRID_STEPS = 9;

/** H2 (dBc) of the circuit at its reference drive with these measured string Vfs, e.g. h2 ≈ −13 dBc for silicon against a red LED. */
export type H2At = (positive: readonly number[], negative: readonly number[]) => number;

/** The engine's H2 for a per-unit circuit (IS refitted from Vf at the bench current), at the reference drive. */
export function engineH2(circuit: Circuit, testCurrentA: number): H2At {
  return (positive, negative) => {
    const unit = perUnitCircuit(circuit, { positive: [...positive], negative: [...negative], testCurrentA });
    const h2 = analyse(periodicOutput(setupAtDrive(unit, unit.referenceDrive), DRAW_SAMPLING), 2).harmonics[1].dbc;
    return Number.isFinite(h2) ? Math.max(H2_FLOOR_DBC, h2) : H2_FLOOR_DBC;
  };
}

const axis = (values: readonly number[], steps: number) => {
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const n = hi > lo ? steps : 1;
  return Array.from({ length: n }, (_, i) => (n === 1 ? lo : lo + ((hi - lo) * i) / (n - 1)));
};

/** H2 over (positive Vf, negative Vf) for one device a side: exact below GRID_STEPS² pairs, else an interpolated grid of engine solves. */
export function h2Table(h2At: H2At, positive: readonly number[], negative: readonly number[]): (p: number, n: number) => number {
  if (positive.length * negative.length <= GRID_STEPS * GRID_STEPS) return (p, n) => h2At([p], [n]);
  const xs = axis(positive, GRID_STEPS);
  const ys = axis(negative, GRID_STEPS);
  const grid = xs.map((x) => ys.map((y) => h2At([x], [y])));
  const locate = (a: number[], v: number) => {
    if (a.length === 1) return { i: 0, t: 0 };
    const i = Math.min(a.length - 2, Math.max(0, Math.floor(((v - a[0]) / (a[a.length - 1] - a[0])) * (a.length - 1))));
    return { i, t: Math.min(1, Math.max(0, (v - a[i]) / (a[i + 1] - a[i]))) };
  };
  return (p, n) => {
    const { i, t } = locate(xs, p);
    const { i: j, t: u } = locate(ys, n);
    const at = (di: number, dj: number) => grid[Math.min(i + di, xs.length - 1)][Math.min(j + dj, ys.length - 1)];
    return (1 - t) * (1 - u) * at(0, 0) + t * (1 - u) * at(1, 0) + (1 - t) * u * at(0, 1) + t * u * at(1, 1);
  };
}

export interface CrossPair { positive: Reading; negative: Reading; h2Dbc: number; offDb: number }

/**
 * Up to `count` (positive, negative) pairs whose H2 is closest to targetDbc in total: exact minimum-cost
 * assignment on the (possibly interpolated) cost; each chosen pair's H2 is then solved directly.
 */
export function crossMatch(positives: readonly Reading[], negatives: readonly Reading[], count: number, h2At: H2At, targetDbc: number): CrossPair[] {
  const k = Math.min(count, positives.length, negatives.length);
  if (k <= 0) return [];
  const table = h2Table(h2At, positives.map((r) => r.vf), negatives.map((r) => r.vf));
  // Rows: the shorter side. Extra zero-cost columns let (rows − k) rows stay unpaired.
  const flip = positives.length > negatives.length;
  const rows = flip ? negatives : positives;
  const cols = flip ? positives : negatives;
  const dummies = rows.length - k;
  const cost = rows.map((r) => [
    ...cols.map((c) => Math.abs((flip ? table(c.vf, r.vf) : table(r.vf, c.vf)) - targetDbc)),
    ...new Array<number>(dummies).fill(0),
  ]);
  const chosen = minCostAssignment(cost)
    .map((j, i) => ({ i, j, cost: j < cols.length ? cost[i][j] : Infinity }))
    .filter((x) => x.j < cols.length)
    .sort((a, b) => a.cost - b.cost)
    .slice(0, k);
  return chosen.map(({ i, j }) => {
    const positive = flip ? cols[j] : rows[i];
    const negative = flip ? rows[i] : cols[j];
    const h2Dbc = h2At([positive.vf], [negative.vf]);
    return { positive, negative, h2Dbc, offDb: Math.abs(h2Dbc - targetDbc) };
  });
}
