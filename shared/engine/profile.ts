// The harmonic profile: reference operating point, drive sweep, clipping onset, static transfer curve.
import { resolveCircuit, setupAtDrive, type Circuit, type CircuitSpec } from './circuit';
import { checkRange } from './errors';
import { monteCarlo, type MonteCarloOptions, type ToleranceBands } from './montecarlo';
import { gainAtDrive, hasCapacitor } from './network';
import { periodicOutput, staticTransfer, steadyState, type SamplingOptions } from './solver';
import { analyse, type Spectrum } from './spectrum';
import type { Decibels, Ratio, Volts } from './units';

/** One point of the drive sweep, e.g. {drive: 0.5, gain: 20.9, thdF: 0.21, harmonicsDbc: [−30, −13, …], …}. */
export interface SweepPoint {
  drive: Ratio;
  gain: Ratio;
  thdF: Ratio;
  thdR: Ratio;
  /** dBc of H2…H7, in order. */
  harmonicsDbc: Decibels[];
  fundamentalPeakV: Volts;
  outputRmsV: Volts;
  dcV: Volts;
}

/** The static transfer curve: output against the stage input at one drive setting. */
export interface TransferCurve {
  drive: Ratio;
  inputV: Volts[];
  outputV: Volts[];
}

/** Everything a spec sheet or chart shows about one clipping option. */
export interface HarmonicProfile {
  reference: { drive: Ratio; gain: Ratio; spectrum: Spectrum };
  sweep: SweepPoint[];
  /** Drive rotation where THD_F crosses 1 % (interpolated in log THD), 0 if already above, null if never. */
  clippingOnsetDrive: Ratio | null;
  /** Null when the network has a capacitor (the response then depends on history). */
  transfer: TransferCurve | null;
  tolerance: ToleranceBands | null;
}

/** Options of computeProfile; every field has a default. */
export interface ProfileOptions {
  harmonics?: number;
  sweepPoints?: number;
  transferPoints?: number;
  sampling?: SamplingOptions;
  /** Run tolerance bands too (slower); default false. */
  monteCarlo?: MonteCarloOptions | false;
}

/** THD_F level that defines the clipping onset: 1 %. */
export const CLIPPING_ONSET_THD: Ratio = 0.01;

/** Drive sweep of THD and H2…H7 over evenly spaced rotations 0..1, e.g. driveSweep(c, 25).length = 25. */
export function driveSweep(spec: CircuitSpec | Circuit, points = 25, sampling: SamplingOptions = {}): SweepPoint[] {
  return sweepWithPeriods(spec, points, sampling).sweep;
}

/** The sweep's points in order, each computed only when asked for (so a caller may stop early). */
function* sweepSteps(spec: CircuitSpec | Circuit, points: number, sampling: SamplingOptions): Generator<{ point: SweepPoint; period: Float64Array }> {
  checkRange(points, 2, 1001, 'sweepPoints');
  const c = resolveCircuit(spec);
  // Warm start of the periodic steady state: extrapolate the capacitor state from the last two drive points.
  const states: number[] = [];
  for (let i = 0; i < points; i++) {
    const drive = i / (points - 1);
    const k = states.length;
    const guess = k >= 2 ? 2 * states[k - 1] - states[k - 2] : k === 1 ? states[0] : NaN;
    const ss = steadyState(setupAtDrive(c, drive), sampling, guess);
    states.push(ss.initialState);
    const s = analyse(ss.samples, 7);
    yield {
      period: ss.samples,
      point: {
        drive, gain: gainAtDrive(c.drive, drive), thdF: s.thdF, thdR: s.thdR,
        harmonicsDbc: s.harmonics.slice(1, 7).map((h) => h.dbc),
        fundamentalPeakV: s.fundamentalPeakV, outputRmsV: s.rmsV, dcV: s.dcV,
      },
    };
  }
}

function sweepWithPeriods(spec: CircuitSpec | Circuit, points: number, sampling: SamplingOptions): { sweep: SweepPoint[]; periods: Float64Array[] } {
  const sweep: SweepPoint[] = [];
  const periods: Float64Array[] = [];
  for (const step of sweepSteps(spec, points, sampling)) {
    sweep.push(step.point);
    periods.push(step.period);
  }
  return { sweep, periods };
}

/**
 * The clipping onset of computeProfile (its 25-point sweep) without computing the whole sweep: equal to
 * clippingOnset(driveSweep(spec, points)), e.g. onsetDrive(spec) ≈ 0.31.
 *
 * A static network's sweep point does not depend on the points before it, and its THD_F rises with the
 * drive, so the two sweep points either side of the 1 % level are found by bisection over the sweep's
 * own points (about log2(points + 1) of them, 5 of 25, where walking the sweep takes up to 25) and
 * interpolated by clippingOnset itself: the same points, the same arithmetic, the same value. A network
 * with a capacitor walks the sweep in order up to the crossing, as computeProfile does, because each
 * point's periodic steady state starts from the points before it.
 */
export function onsetDrive(spec: CircuitSpec | Circuit, points = 25, sampling: SamplingOptions = {}): Ratio | null {
  const c = resolveCircuit(spec);
  if (hasCapacitor(c.network)) {
    return clippingOnset((function* () { for (const step of sweepSteps(c, points, sampling)) yield step.point; })());
  }
  checkRange(points, 2, 1001, 'sweepPoints');
  // Sweep point i as sweepSteps computes it (drive i/(points − 1), THD_F over H2…H7), each at most once.
  const thd = new Map<number, Ratio>();
  const point = (i: number) => {
    const drive = i / (points - 1);
    if (!thd.has(i)) thd.set(i, analyse(steadyState(setupAtDrive(c, drive), sampling).samples, 7).thdF);
    return { drive, thdF: thd.get(i)! };
  };
  // Invariant: point lo is below the level (or lo = −1, before the sweep), point hi at or above it (or hi = points, past it).
  let lo = -1;
  let hi = points;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (point(mid).thdF >= CLIPPING_ONSET_THD) hi = mid;
    else lo = mid;
  }
  if (hi === points) return null;
  return clippingOnset(lo < 0 ? [point(hi)] : [point(lo), point(hi)]);
}

/** Drive where THD_F first reaches 1 %, interpolated in log10(THD_F), e.g. 0.31; 0 if above from the start, null if never. */
export function clippingOnset(sweep: Iterable<Pick<SweepPoint, 'drive' | 'thdF'>>, level: Ratio = CLIPPING_ONSET_THD): Ratio | null {
  let a: Pick<SweepPoint, 'drive' | 'thdF'> | null = null;
  for (const b of sweep) {
    if (b.thdF >= level) {
      if (a === null) return b.drive;
      const la = Math.log10(Math.max(a.thdF, 1e-300));
      const lb = Math.log10(b.thdF);
      const t = (Math.log10(level) - la) / (lb - la);
      return a.drive + t * (b.drive - a.drive);
    }
    a = b;
  }
  return null;
}

/**
 * Static transfer curve (output vs stage input) at a drive rotation over ±range, e.g. transferCurve(c, {points: 101}).
 * Throws for a network with a capacitor. Default range: ±1.25 × the circuit's input peak.
 */
export function transferCurve(spec: CircuitSpec | Circuit, opts: { drive?: Ratio; points?: number; rangeV?: Volts } = {}): TransferCurve {
  const c = resolveCircuit(spec);
  const drive = checkRange(opts.drive ?? c.referenceDrive, 0, 1, 'drive');
  const points = checkRange(opts.points ?? 101, 2, 100001, 'points');
  const range = checkRange(opts.rangeV ?? 1.25 * c.drive.inputPeakV, 1e-9, 1000, 'rangeV');
  const inputV: number[] = [];
  for (let i = 0; i < points; i++) inputV.push(-range + (2 * range * i) / (points - 1));
  const outputV = Array.from(staticTransfer(setupAtDrive(c, drive), inputV));
  return { drive, inputV, outputV };
}

/** Full harmonic profile of a circuit, e.g. computeProfile(spec).clippingOnsetDrive ≈ 0.2. */
export function computeProfile(spec: CircuitSpec | Circuit, options: ProfileOptions = {}): HarmonicProfile {
  const c = resolveCircuit(spec);
  const harmonics = options.harmonics ?? 10;
  const sampling = options.sampling ?? {};
  const { sweep, periods } = sweepWithPeriods(c, options.sweepPoints ?? 25, sampling);
  const referenceSetup = setupAtDrive(c, c.referenceDrive);
  // The reference setting usually sits on the sweep (0.5 of 25 points): reuse that period.
  const onSweep = sweep.findIndex((p) => p.drive === c.referenceDrive);
  const referencePeriod = onSweep >= 0 ? periods[onSweep] : periodicOutput(referenceSetup, sampling);
  return {
    reference: {
      drive: c.referenceDrive, gain: referenceSetup.driveGain,
      spectrum: analyse(referencePeriod, harmonics),
    },
    sweep,
    clippingOnsetDrive: clippingOnset(sweep),
    transfer: hasCapacitor(c.network) ? null : transferCurve(c, { points: options.transferPoints ?? 101 }),
    tolerance: options.monteCarlo ? monteCarlo(c, options.monteCarlo) : null,
  };
}
