// Current through a series string of junction devices at a given voltage: the inverse of
// V(I) = Σ N·Vt·ln(1 + I/IS) + I·ΣRS, found by safeguarded Newton with bracketing.
import { SOLVE_RELATIVE_TOLERANCE, celsiusToKelvin, thermalVoltage } from './constants';
import { saturationCurrentAt, type DeviceModel } from './device';
import { SolverError } from './errors';
import type { Celsius } from './units';

/** Largest exponent argument used; beyond it the string's I(V) continues linearly (finite, monotone). */
const EXPONENT_CAP = 700;
const MAX_ITERATIONS = 200;
const TOLERANCE = SOLVE_RELATIVE_TOLERANCE;
// V(y) is analytic in the log-current y with V″/V′ of order one, so Newton converges quadratically: a step
// below √tolerance leaves an error of order tolerance once taken, and is accepted without evaluating again.
const ACCEPT_STEP = Math.sqrt(SOLVE_RELATIVE_TOLERANCE);

/**
 * A string prepared for repeated solves at one temperature: identical devices are merged
 * (m devices of N act as one of m·N). Holds a warm start, so reuse it only within one solve sequence.
 */
export interface PreparedString {
  empty: boolean;
  /** Saturation current of each merged group at temperature. */
  is: Float64Array;
  /** m·N·Vt of each group. */
  nvt: Float64Array;
  /** is − isMin per group, for cancellation-free sums in deep reverse bias. */
  excess: Float64Array;
  isMin: number;
  nvtMin: number;
  rs: number;
  /** Voltage and slope where the linear continuation starts. */
  capVolts: number;
  capCurrent: number;
  capConductance: number;
  /** Warm start in the log-current variable y, with I = isMin·expm1(y). */
  y: number;
  /** Voltage of the last solve and dy/dV there: the next solve starts one Newton step ahead of it. */
  vLast: number;
  dydv: number;
  /** Conductance dI/dV at the last solve. */
  conductance: number;
  /** The node solver's last two forward solutions in y, for a predictor (NaN when unknown). */
  yLast: number;
  yBefore: number;
}

/** Prepare a device string at a temperature, e.g. prepareString([si, si], 27). */
export function prepareString(devices: readonly DeviceModel[], temperatureC: Celsius): PreparedString {
  const vt = thermalVoltage(celsiusToKelvin(temperatureC));
  const groups: { is: number; n: number; rs: number; count: number }[] = [];
  for (const d of devices) {
    const is = saturationCurrentAt(d, temperatureC);
    const g = groups.find((x) => x.is === is && x.n === d.n);
    if (g) { g.count += 1; g.rs += d.rs; } else groups.push({ is, n: d.n, rs: d.rs, count: 1 });
  }
  const s: PreparedString = {
    empty: groups.length === 0,
    is: new Float64Array(groups.map((g) => g.is)),
    nvt: new Float64Array(groups.map((g) => g.count * g.n * vt)),
    excess: new Float64Array(groups.length),
    isMin: Infinity, nvtMin: 0, rs: groups.reduce((a, g) => a + g.rs, 0),
    capVolts: Infinity, capCurrent: 0, capConductance: 0, y: 0, vLast: 0, dydv: 0, conductance: 0, yLast: NaN, yBefore: NaN,
  };
  groups.forEach((g, i) => {
    if (g.is < s.isMin) { s.isMin = g.is; s.nvtMin = s.nvt[i]; }
  });
  // Several groups may share the smallest IS; the bracket only needs one of them.
  for (let i = 0; i < groups.length; i++) s.excess[i] = s.is[i] - s.isMin;
  if (!s.empty) {
    const ey = Math.exp(EXPONENT_CAP);
    const i = s.isMin * (ey - 1);
    let v = i * s.rs;
    let slope = s.rs;
    for (let k = 0; k < s.is.length; k++) {
      v += s.nvt[k] * Math.log1p(i / s.is[k]);
      slope += s.nvt[k] / (s.is[k] + i);
    }
    s.capVolts = v; s.capCurrent = i; s.capConductance = 1 / slope;
  }
  return s;
}

/** Residual f(y) = V(I(y)) − v and its slope; writes the slope into scratch[0], dV/dI into scratch[1], I into scratch[2]. */
function residual(s: PreparedString, y: number, v: number, scratch: Float64Array): number {
  // e^y and e^y − 1 each to full relative precision, with one transcendental call.
  let em: number;
  let ey: number;
  if (y > -1) { em = Math.expm1(y); ey = em + 1; } else { ey = Math.exp(y); em = ey - 1; }
  const i = s.isMin * em;
  const isMinEy = s.isMin * ey;
  let f = i * s.rs - v;
  let dvdi = s.rs;
  for (let k = 0; k < s.is.length; k++) {
    const sum = s.excess[k] + isMinEy; // = is_k + I without cancellation
    // For a group at the smallest IS, ln(1 + I/IS) is exactly y.
    f += s.nvt[k] * (s.excess[k] === 0 ? y : y > -1 ? Math.log1p(i / s.is[k]) : Math.log(sum / s.is[k]));
    dvdi += s.nvt[k] / sum;
  }
  scratch[0] = isMinEy * dvdi;
  scratch[1] = dvdi;
  scratch[2] = i;
  return f;
}

const scratch = new Float64Array(3);

/**
 * Current through the string at voltage v (positive = forward), e.g. ≈1e-3 A for a 1N4148-like
 * device at 0.585 V; also sets s.conductance. Converges for any finite v; throws SolverError otherwise.
 */
export function stringCurrent(s: PreparedString, v: number): number {
  if (s.empty) { s.conductance = 0; return 0; }
  if (v >= s.capVolts) {
    s.conductance = s.capConductance;
    return s.capCurrent + (v - s.capVolts) * s.capConductance;
  }
  if (s.is.length === 1 && s.rs === 0) {
    const y = v / s.nvtMin;
    const i = s.isMin * Math.expm1(y);
    s.conductance = s.isMin * Math.exp(y) / s.nvtMin;
    return i;
  }
  let lo: number;
  let hi: number;
  if (v > 0) {
    lo = 0;
    hi = Math.min(v / s.nvtMin, EXPONENT_CAP);
    if (s.rs > 0) hi = Math.min(hi, Math.log1p(v / (s.isMin * s.rs)));
  } else if (v < 0) {
    lo = v / s.nvtMin;
    hi = 0;
  } else {
    residual(s, 0, 0, scratch);
    s.conductance = 1 / scratch[1];
    s.y = 0;
    return 0;
  }
  if (v < 0 && s.is.length === 1) {
    // Reverse bias: |I| < IS, so the RS drop is at most IS·RS and y = (v − I·RS)/(N·Vt) moves from
    // v/(N·Vt) by at most q = IS·RS/(N·Vt). When q is tiny one linear correction is exact to q²·IS.
    const q = (s.isMin * s.rs) / s.nvtMin;
    if (q < 1e-6) {
      const y0 = v / s.nvtMin;
      const ey = Math.exp(y0);
      const i0 = s.isMin * (ey - 1);
      const dy = -(i0 * s.rs) / s.nvtMin;
      s.conductance = (s.isMin * ey) / (s.nvtMin + s.isMin * ey * s.rs);
      s.y = y0 + dy;
      return i0 + s.isMin * ey * dy;
    }
  }
  // Start one Newton step ahead of the last solve (free: its slope is kept), which is all but exact when v
  // moved little, as between the iterations of a node solve. A lone group in reverse bias has a closer guess:
  // the RS drop is at most IS·RS there, so y ≈ v/(N·Vt).
  let guess = v < 0 && s.is.length === 1
    ? (v - s.isMin * s.rs * Math.expm1(v / s.nvtMin)) / s.nvtMin
    : s.y + (v - s.vLast) * s.dydv;
  if (!(guess > lo && guess < hi)) guess = s.y;
  let y = guess > lo && guess < hi ? guess : 0.5 * (lo + hi);
  for (let iter = 0; iter < MAX_ITERATIONS; iter++) {
    const f = residual(s, y, v, scratch);
    const step = f / scratch[0];
    const scale = Math.max(1, Math.abs(y));
    if (f === 0 || Math.abs(step) <= ACCEPT_STEP * scale) {
      // Converged: take the last Newton step without evaluating again (its error is of order step²).
      s.y = y - step;
      s.conductance = 1 / scratch[1];
      s.vLast = v;
      s.dydv = 1 / scratch[0];
      // I(y − step) to first order, dI/dy = IS·e^y = slope / (dV/dI).
      return scratch[2] - step * (scratch[0] / scratch[1]);
    }
    if (f > 0) hi = y; else lo = y;
    let next = y - step;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= TOLERANCE * scale) {
      residual(s, next, v, scratch);
      s.y = next;
      s.conductance = 1 / scratch[1];
      s.vLast = v;
      s.dydv = 1 / scratch[0];
      return s.isMin * Math.expm1(next);
    }
    y = next;
  }
  throw new SolverError(`device string did not converge at ${v} V after ${MAX_ITERATIONS} iterations`);
}

/**
 * Voltage across the string when it carries I = isMin·expm1(y) (explicit, no solve), e.g. the forward
 * string's voltage in the node solve; writes dV/dI into out[0], I into out[1] and dI/dy into out[2].
 */
export function stringVoltageAt(s: PreparedString, y: number, out: Float64Array): number {
  const f = residual(s, y, 0, scratch);
  out[0] = scratch[1];
  out[1] = scratch[2];
  // dI/dy = IS·e^y
  out[2] = scratch[0] / scratch[1];
  return f;
}
