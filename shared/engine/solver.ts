// Steady-state output of a drive stage and clipping network for a sine tone.
// Both topologies reduce to one node law: v/R + D(v) + C·dv/dt = J(t), with D the two strings'
// net current; shunt: R = series, J = Vd/R, out = v; feedback: R = Rf, J = Vd/Rg, out = Vd + v.
import { SOLVE_RELATIVE_TOLERANCE } from './constants';
import { SolverError } from './errors';
import { hasCapacitor, type StageSetup } from './network';
import { prepareString, stringCurrent, stringVoltageAt, type PreparedString } from './strings';
import type { Volts } from './units';

const MAX_ITERATIONS = 300;
// A local copy: module bindings may be read through accessors in some loaders, and this sits in the hot loop.
const TOLERANCE = SOLVE_RELATIVE_TOLERANCE;
// Newton converges quadratically near the root (the law is analytic in y, with y″/y′ of order one), so a
// step below √tolerance leaves an error of order tolerance once taken: accept it without re-evaluating.
const ACCEPT_STEP = Math.sqrt(SOLVE_RELATIVE_TOLERANCE);
/** Largest log-current the node solve's cheap upper bound may stand at (e^y stays far from overflow). */
const LOOSE_BOUND = 300;

/** Sampling of one period: points (a power of two) and substeps per point when a capacitor is present. */
export interface SamplingOptions {
  /** Samples per period, a power of two; default 1024 without a capacitor, 512 with one. */
  samples?: number;
  /** Integration substeps per sample when a capacitor is present; default 2. */
  oversampling?: number;
}

interface NodeLaw {
  positive: PreparedString;
  negative: PreparedString;
  /** 1/R of the node law. */
  conductance: number;
  /** J = drive · this. */
  injection: number;
  capacitance: number;
  /** Diode conductance dD/dv at the last solve. */
  diodeConductance: number;
  /** Time to the next solve over time since the last, for the predictor's linear extrapolation. */
  stepRatio: number;
}

function nodeLaw(setup: StageSetup): NodeLaw {
  const n = setup.network;
  const shunt = n.topology === 'shunt';
  return {
    positive: prepareString(n.topology === 'none' ? [] : n.positive, setup.temperatureC),
    negative: prepareString(n.topology === 'none' ? [] : n.negative, setup.temperatureC),
    conductance: shunt ? 1 / n.seriesOhms : 1 / n.feedbackOhms,
    injection: shunt ? 1 / n.seriesOhms : 1 / n.groundOhms,
    capacitance: shunt ? n.shuntFarads : n.feedbackFarads,
    diodeConductance: 0,
    stepRatio: 1,
  };
}

/** Net diode current D(v) = I₊(v) − I₋(−v); sets law.diodeConductance. */
function diodeCurrent(law: NodeLaw, v: number): number {
  const ip = stringCurrent(law.positive, v);
  const gp = law.positive.conductance;
  const ineg = stringCurrent(law.negative, -v);
  law.diodeConductance = gp + law.negative.conductance;
  return ip - ineg;
}

/**
 * Solve α·v + D(v) = β for v (D increasing, D(0) = 0, so v has the sign of β). The unknown is the
 * forward string's log-current y (I = IS·expm1(y)), in which its voltage is explicit and the law is
 * convex, so a safeguarded Newton with bracket [0, y_max] converges quickly for any IS and N; the
 * reverse string's tiny current comes from its own bracketed solve. Throws SolverError if it fails.
 */
function solveNode(law: NodeLaw, alpha: number, beta: number, guess: number): number {
  if (beta === 0) { diodeCurrent(law, 0); return 0; }
  const sign = beta > 0 ? 1 : -1;
  const forward = sign > 0 ? law.positive : law.negative;
  const reverse = sign > 0 ? law.negative : law.positive;
  if (forward.empty) return solveNodeInVolts(law, alpha, beta, guess);
  const b = sign * beta;
  let lo = 0;
  // Upper bound: V(y) ≥ N·Vt·y, so α·V alone reaches β there. It costs no logarithm; only when it is
  // too loose to keep e^y finite are the tighter bounds I(y) ≤ β and I·RS ≤ β/α taken.
  let hi = b / (alpha * forward.nvtMin);
  if (!(hi <= LOOSE_BOUND)) {
    hi = Math.min(hi, Math.log1p(b / forward.isMin));
    if (forward.rs > 0) hi = Math.min(hi, Math.log1p(b / (alpha * forward.isMin * forward.rs)));
  }
  // Predictor: extrapolate the last two forward solutions linearly in time.
  let y = forward.yLast + law.stepRatio * (forward.yLast - forward.yBefore);
  if (!(y > lo && y < hi)) y = forward.yLast;
  if (!(y > lo && y < hi)) y = 0.5 * (lo + hi);
  if (reverse.yLast === reverse.yLast) { reverse.yLast = NaN; reverse.yBefore = NaN; }
  for (let iter = 0; iter < MAX_ITERATIONS; iter++) {
    const v = stringVoltageAt(forward, y, work);
    const dvdi = work[0];
    const i = work[1];
    const didy = work[2];
    const ir = stringCurrent(reverse, -v);
    const gr = reverse.conductance;
    const h = alpha * v + i - ir - b;
    // dH/dy = dI/dy · (1 + (α + g_reverse)·dV/dI)
    const slope = didy * (1 + (alpha + gr) * dvdi);
    const step = h / slope;
    const scale = Math.max(1, Math.abs(y));
    const tol = TOLERANCE * scale;
    if (h === 0 || Math.abs(step) <= ACCEPT_STEP * scale) {
      // Converged: move to the Newton point to first order instead of evaluating again.
      forward.yBefore = forward.yLast;
      forward.yLast = y - step;
      forward.conductance = 1 / dvdi;
      law.diodeConductance = forward.conductance + gr;
      return sign * (v - step * didy * dvdi);
    }
    if (h > 0) hi = y; else lo = y;
    let next = y - step;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= tol) {
      forward.yBefore = forward.yLast;
      forward.yLast = next;
      const vEnd = stringVoltageAt(forward, next, work);
      forward.conductance = 1 / work[0];
      stringCurrent(reverse, -vEnd);
      law.diodeConductance = forward.conductance + reverse.conductance;
      return sign * vEnd;
    }
    y = next;
  }
  throw new SolverError(`clipping node did not converge (α=${alpha}, β=${beta}) after ${MAX_ITERATIONS} iterations`);
}

const work = new Float64Array(3);

/** The same law solved in volts, for a network whose forward string is empty (only leakage flows). */
function solveNodeInVolts(law: NodeLaw, alpha: number, beta: number, guess: number): number {
  const end = beta / alpha;
  let lo = Math.min(0, end);
  let hi = Math.max(0, end);
  let v = guess > lo && guess < hi ? guess : end;
  for (let iter = 0; iter < MAX_ITERATIONS; iter++) {
    const h = alpha * v + diodeCurrent(law, v) - beta;
    if (h === 0) return v;
    if (h > 0) hi = v; else lo = v;
    let next = v - h / (alpha + law.diodeConductance);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    const tol = 1e-12 * Math.abs(next) + 1e-300;
    if (Math.abs(next - v) <= tol || hi - lo <= tol) {
      diodeCurrent(law, next);
      return next;
    }
    v = next;
  }
  throw new SolverError(`clipping node did not converge (α=${alpha}, β=${beta}) after ${MAX_ITERATIONS} iterations`);
}

function checkPowerOfTwo(n: number, path: string): void {
  if (!Number.isInteger(n) || n < 64 || n > 65536 || (n & (n - 1)) !== 0) {
    throw new SolverError(`${path} must be a power of two in 64..65536, got ${n}`, path);
  }
}

/** Drive-stage output at phase θ (radians): gain·A·sin θ, clipped ideally at the rail. */
function driveAt(setup: StageSetup, phase: number): Volts {
  const v = setup.driveGain * setup.inputPeakV * Math.sin(phase);
  const rail = setup.railPeakV;
  if (rail === null) return v;
  return v > rail ? rail : v < -rail ? -rail : v;
}

/** Static (memoryless) output for a drive-stage voltage, e.g. ≈0.6 V for 5 V into a 1N4148-like shunt pair. */
function staticOutput(setup: StageSetup, law: NodeLaw, vd: Volts, guess: number): { out: Volts; state: number } {
  if (setup.network.topology === 'none') return { out: vd, state: 0 };
  const v = solveNode(law, law.conductance, vd * law.injection, guess);
  return { out: setup.network.topology === 'feedback' ? vd + v : v, state: v };
}

/**
 * One steady-state period of the output, sampled coherently at `samples` points starting at the
 * input's positive-going zero crossing, e.g. periodicOutput(setup).length = 1024.
 */
export function periodicOutput(setup: StageSetup, options: SamplingOptions = {}): Float64Array {
  return steadyState(setup, options).samples;
}

/**
 * Steady-state period plus its starting capacitor state; pass a neighbouring setup's initialState as
 * guess to shorten the periodic-steady-state search (shooting), e.g. along a drive sweep.
 */
export function steadyState(setup: StageSetup, options: SamplingOptions = {}, guess = NaN): SteadyState {
  if (hasCapacitor(setup.network)) return dynamicPeriod(setup, options, guess);
  return { samples: staticPeriod(setup, options), initialState: 0 };
}

function staticPeriod(setup: StageSetup, options: SamplingOptions): Float64Array {
  const n = options.samples ?? 1024;
  checkPowerOfTwo(n, 'samples');
  const out = new Float64Array(n);
  const law = nodeLaw(setup);
  // Quarter-wave symmetry of the sine input: sample N/2 − k equals sample k, sample 3N/2 − k equals k.
  let state = 0;
  for (let k = 0; k <= n / 4; k++) {
    const r = staticOutput(setup, law, driveAt(setup, (2 * Math.PI * k) / n), state);
    out[k] = r.out; state = r.state;
  }
  state = 0;
  for (let k = n / 2; k <= (3 * n) / 4; k++) {
    const r = staticOutput(setup, law, driveAt(setup, (2 * Math.PI * k) / n), state);
    out[k] = r.out; state = r.state;
  }
  for (let k = n / 4 + 1; k < n / 2; k++) out[k] = out[n / 2 - k];
  for (let k = (3 * n) / 4 + 1; k < n; k++) out[k] = out[(3 * n) / 2 - k];
  return out;
}

/** Static transfer: output for each drive-stage input voltage (no capacitor), e.g. for a Vout-vs-Vin chart. */
export function staticTransfer(setup: StageSetup, inputs: readonly Volts[]): Float64Array {
  if (hasCapacitor(setup.network)) {
    throw new SolverError('a static transfer curve needs a network without a capacitor', 'clipper');
  }
  const law = nodeLaw(setup);
  const out = new Float64Array(inputs.length);
  let state = 0;
  for (let i = 0; i < inputs.length; i++) {
    const vin = inputs[i];
    const g = setup.driveGain * vin;
    const rail = setup.railPeakV;
    const vd = rail === null ? g : Math.max(-rail, Math.min(rail, g));
    const r = staticOutput(setup, law, vd, state);
    out[i] = r.out; state = r.state;
  }
  return out;
}

// TR-BDF2 (Bank et al., 1985): a trapezoidal stage to t + γh, then BDF2; one-step and L-stable,
// so stiff diode conduction does not ring and the period map is scalar (one capacitor voltage).
const GAMMA = 2 - Math.SQRT2;
const C1 = 1 / (GAMMA * (2 - GAMMA));
const C2 = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));
const MAX_SHOOTING = 60;

interface PeriodRun {
  residual: number;
  slope: number;
  start: number;
  peak: number;
}

/** One steady-state period and the capacitor state it starts from (a warm start for a neighbouring setup). */
export interface SteadyState {
  samples: Float64Array;
  /** Capacitor voltage at the period's start (node voltage for shunt, across Rf for feedback); 0 when static. */
  initialState: Volts;
}

/** Residual below which one Newton correction of the shooting is applied to the recorded period, not re-run. */
const CORRECTION_ONLY = 1e-6;

function dynamicPeriod(setup: StageSetup, options: SamplingOptions, guess: number): SteadyState {
  const n = options.samples ?? 512;
  checkPowerOfTwo(n, 'samples');
  const m = options.oversampling ?? 2;
  if (!Number.isInteger(m) || m < 1 || m > 64) throw new SolverError(`oversampling must be an integer in 1..64, got ${m}`, 'oversampling');
  const law = nodeLaw(setup);
  const steps = n * m;
  const period = 1 / setup.toneHz;
  const h = period / steps;
  const cap = law.capacitance;
  const g = law.conductance;
  const k1 = (GAMMA * h) / 2;
  const k2 = ((1 - GAMMA) / (2 - GAMMA)) * h;
  const a1 = cap / k1 + g;
  const a2 = cap / k2 + g;
  const jStage = new Float64Array(steps);
  const jEnd = new Float64Array(steps);
  for (let j = 0; j < steps; j++) {
    jStage[j] = driveAt(setup, (2 * Math.PI * (j + GAMMA)) / steps) * law.injection;
    jEnd[j] = driveAt(setup, (2 * Math.PI * (j + 1)) / steps) * law.injection;
  }
  const state = new Float64Array(n);
  const sensitivity = new Float64Array(n);

  // Each shooting run starts early (the pre-roll) from the trial state x and records t = 0…T. The diodes
  // only add conductance, so R·C bounds the memory: 12 R·C of pre-roll forgets the start to e^−12 ≈ 6e-6,
  // and one run is periodic. When 12 R·C exceeds half a period, Newton shooting does the work instead.
  const memory = 12 * cap / g;
  const preroll = memory <= period / 2 ? Math.max(4, Math.ceil(memory / h)) : steps >> 3;
  const run = (x: number): PeriodRun => {
    let v = x;
    const d = diodeCurrent(law, v);
    let f = (driveAt(setup, (2 * Math.PI * (steps - preroll)) / steps) * law.injection - g * v - d) / cap;
    let s = 1;
    let sf = -(g + law.diodeConductance) / cap;
    let peak = 0;
    let startValue = v;
    let startSensitivity = s;
    for (let t = 0; t < steps + preroll; t++) {
      const j = t < preroll ? steps - preroll + t : t - preroll;
      if (t >= preroll && j % m === 0) {
        state[j / m] = v; sensitivity[j / m] = s;
        if (j === 0) { startValue = v; startSensitivity = s; }
      }
      const r1 = v + k1 * f;
      law.stepRatio = GAMMA / (1 - GAMMA);
      const vg = solveNode(law, a1, (cap * r1) / k1 + jStage[j], v);
      const sg = ((cap / k1) * (s + k1 * sf)) / (a1 + law.diodeConductance);
      const r2 = C1 * vg - C2 * v;
      law.stepRatio = (1 - GAMMA) / GAMMA;
      const vn = solveNode(law, a2, (cap * r2) / k2 + jEnd[j], vg);
      const sr2 = C1 * sg - C2 * s;
      const sn = ((cap / k2) * sr2) / (a2 + law.diodeConductance);
      f = (vn - r2) / k2;
      sf = (sn - sr2) / k2;
      v = vn; s = sn;
      if (Math.abs(v) > peak) peak = Math.abs(v);
    }
    // Periodicity residual v(T) − v(0) and its derivative with respect to the trial state.
    return { residual: v - startValue, slope: s - startSensitivity, start: startValue, peak };
  };

  let x = Number.isFinite(guess) ? guess : 0;
  let last = run(x);
  for (let it = 0; it < MAX_SHOOTING; it++) {
    const scale = Math.max(last.peak, 1e-9);
    const residual = last.residual;
    if (Math.abs(residual) <= 1e-10 * scale) return { samples: toOutput(setup, state, n), initialState: last.start };
    // Newton on F(x) = v(T) − v(0); F' < 0 for a contracting network.
    let step = -residual / last.slope;
    if (Math.abs(residual) <= CORRECTION_ONLY * scale) {
      // Close enough that the period shifts linearly with x: correct the recorded samples by step·∂v/∂x
      // (quadratic error ≈ step²/(N·Vt), below the 1e-10 target) instead of simulating it again.
      for (let k = 0; k < n; k++) state[k] += step * sensitivity[k];
      return { samples: toOutput(setup, state, n), initialState: last.start + step * sensitivity[0] };
    }
    let next = run(x + step);
    // Halve the step while the residual grows.
    for (let halving = 0; halving < 20 && Math.abs(next.residual) > Math.abs(residual); halving++) {
      step /= 2;
      next = run(x + step);
    }
    x += step; last = next;
  }
  const residual = last.residual;
  throw new SolverError(`periodic steady state not reached after ${MAX_SHOOTING} shooting iterations (residual ${residual} V)`);
}

function toOutput(setup: StageSetup, state: Float64Array, n: number): Float64Array {
  if (setup.network.topology !== 'feedback') return state.slice();
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = driveAt(setup, (2 * Math.PI * k) / n) + state[k];
  return out;
}
