// Tolerance bands: Monte Carlo over device spread and component tolerance with a seeded generator.
import { celsiusToKelvin, thermalVoltage, NOMINAL_TEMPERATURE_C } from './constants';
import { resolveCircuit, setupAtDrive, type Circuit, type CircuitSpec } from './circuit';
import type { DeviceModel } from './device';
import { checkRange } from './errors';
import type { ClippingNetwork, StageSetup } from './network';
import { mulberry32, normalSource, percentile } from './random';
import { steadyState, type SamplingOptions } from './solver';
import { analyse } from './spectrum';
import type { Decibels, Ratio, Volts } from './units';

/** Spread assumptions, each with a default; e.g. {draws: 200, seed: 1}. */
export interface MonteCarloOptions {
  draws?: number;
  seed?: number;
  /** 1σ spread of each device's forward voltage at fixed current (applied through IS); default 10 mV. */
  vfSigmaV?: Volts;
  /** 1σ relative spread of N; default 1 %. */
  emissionSigma?: Ratio;
  /** Resistors uniform within ±this fraction; default 5 %. */
  resistorTolerance?: Ratio;
  /** Capacitors uniform within ±this fraction; default 10 %. */
  capacitorTolerance?: Ratio;
  /** Orders THD_F is taken over, as in the profile; default 10. */
  harmonics?: number;
  /** Drive rotation to evaluate at; default the circuit's reference drive. */
  drive?: Ratio;
  /** Sampling of every draw; default DRAW_SAMPLING where the nominal circuit allows it (see drawSampling). */
  sampling?: SamplingOptions;
}

/**
 * Sampling the draws use by default: 256 points of one step each, a quarter of a single operating point's
 * steps (512 × 2 with a capacitor) and of its static points (1024). Against ngspice it stays within 0.03 dB
 * on the engine's capacitor circuits (checked in tests/engine/ngspice.test.ts), a tenth of the 0.3 dB agreement.
 */
export const DRAW_SAMPLING: Readonly<SamplingOptions> = { samples: 256, oversampling: 1 };
/** Largest difference between DRAW_SAMPLING and the default sampling on the nominal circuit that lets the draws use it. */
export const DRAW_SAMPLING_CHECK = { db: 0.05, thdRelative: 0.003 };

/** P5, P50 and P95 of one figure over the draws. */
export interface Band {
  p5: number;
  p50: number;
  p95: number;
}

/** Tolerance bands at the reference setting, e.g. {thdF: {p5: 0.18, p50: 0.21, p95: 0.24}, …}. */
export interface ToleranceBands {
  draws: number;
  seed: number;
  drive: Ratio;
  thdF: Band;
  h2Dbc: Band;
  h3Dbc: Band;
}

function band(values: number[]): Band {
  return { p5: percentile(values, 5), p50: percentile(values, 50), p95: percentile(values, 95) };
}

/** The circuits one Monte Carlo run draws: the nominal setup and one setup per draw, e.g. to run them elsewhere. */
export interface MonteCarloDraws {
  drive: Ratio;
  nominal: StageSetup;
  draws: StageSetup[];
}

/** The seeded draws of monteCarlo(spec, options), in its order, e.g. monteCarloDraws(c, {draws: 5, seed: 3}).draws.length = 5. */
export function monteCarloDraws(spec: CircuitSpec | Circuit, options: MonteCarloOptions = {}): MonteCarloDraws {
  const c = resolveCircuit(spec);
  const draws = checkRange(options.draws ?? 200, 1, 100000, 'draws');
  const vfSigma = checkRange(options.vfSigmaV ?? 0.01, 0, 0.5, 'vfSigmaV');
  const nSigma = checkRange(options.emissionSigma ?? 0.01, 0, 0.3, 'emissionSigma');
  const rTol = checkRange(options.resistorTolerance ?? 0.05, 0, 0.5, 'resistorTolerance');
  const cTol = checkRange(options.capacitorTolerance ?? 0.1, 0, 0.5, 'capacitorTolerance');
  const drive = checkRange(options.drive ?? c.referenceDrive, 0, 1, 'drive');
  const uniform = mulberry32(options.seed ?? 1);
  const normal = normalSource(uniform);
  const vt = thermalVoltage(celsiusToKelvin(NOMINAL_TEMPERATURE_C));
  const spreadDevice = (d: DeviceModel): DeviceModel => {
    const n = d.n * Math.max(0.5 / d.n, 1 + nSigma * normal());
    // A Vf shift ΔV at fixed current is IS·exp(−ΔV/(N·Vt)).
    const is = d.is * Math.exp(-(vfSigma * normal()) / (n * vt));
    return { ...d, n: Math.min(10, n), is };
  };
  const spread = (x: number, tol: number): number => x * (1 + tol * (2 * uniform() - 1));
  const nominal = setupAtDrive(c, drive);
  const n = c.network;
  const setups: StageSetup[] = [];
  for (let i = 0; i < draws; i++) {
    const network: ClippingNetwork = {
      ...n,
      seriesOhms: spread(n.seriesOhms, rTol), feedbackOhms: spread(n.feedbackOhms, rTol), groundOhms: spread(n.groundOhms, rTol),
      shuntFarads: spread(n.shuntFarads, cTol), feedbackFarads: spread(n.feedbackFarads, cTol),
      positive: n.positive.map(spreadDevice), negative: n.negative.map(spreadDevice),
    };
    setups.push({ ...nominal, network });
  }
  return { drive, nominal, draws: setups };
}

/** Monte Carlo tolerance bands of THD_F, H2 and H3 with a seeded mulberry32 generator, e.g. monteCarlo(c, {draws: 200, seed: 7}). */
export function monteCarlo(spec: CircuitSpec | Circuit, options: MonteCarloOptions = {}): ToleranceBands {
  const { drive, nominal, draws } = monteCarloDraws(spec, options);
  const orders = Math.max(3, options.harmonics ?? 10);
  const { sampling, initialState } = drawSampling(nominal, orders, options.sampling);
  const thd: number[] = [];
  const h2: Decibels[] = [];
  const h3: Decibels[] = [];
  for (const setup of draws) {
    // Every draw starts its periodic steady-state search from the nominal circuit's state.
    const s = analyse(steadyState(setup, sampling, initialState).samples, orders);
    thd.push(s.thdF); h2.push(s.harmonics[1].dbc); h3.push(s.harmonics[2].dbc);
  }
  return { draws: draws.length, seed: options.seed ?? 1, drive, thdF: band(thd), h2Dbc: band(h2), h3Dbc: band(h3) };
}

/**
 * The draws' sampling and the nominal circuit's steady state at it. A caller's sampling is used as given.
 * Otherwise DRAW_SAMPLING, where error allows: the nominal circuit is solved at both it and the default
 * sampling, and the draws use it only when every harmonic above −60 dBc (and the fundamental) agrees within
 * DRAW_SAMPLING_CHECK.db and THD_F within DRAW_SAMPLING_CHECK.thdRelative; else the default sampling.
 */
function drawSampling(base: StageSetup, orders: number, given: SamplingOptions | undefined): { sampling: SamplingOptions; initialState: number } {
  if (given) return { sampling: given, initialState: steadyState(base, given).initialState };
  const fine = steadyState(base, {});
  if (2 * orders >= (DRAW_SAMPLING.samples ?? 0) / 2) return { sampling: {}, initialState: fine.initialState };
  const coarse = steadyState(base, DRAW_SAMPLING, fine.initialState);
  const a = analyse(fine.samples, orders);
  const b = analyse(coarse.samples, orders);
  let worst = Math.abs(toDb(b.fundamentalPeakV) - toDb(a.fundamentalPeakV));
  for (let k = 2; k <= orders; k++) {
    if (a.harmonics[k - 1].dbc > -60) worst = Math.max(worst, Math.abs(b.harmonics[k - 1].dbc - a.harmonics[k - 1].dbc));
  }
  const thdOff = a.thdF > 0 ? Math.abs(b.thdF / a.thdF - 1) : 0;
  if (worst <= DRAW_SAMPLING_CHECK.db && thdOff <= DRAW_SAMPLING_CHECK.thdRelative) {
    return { sampling: DRAW_SAMPLING, initialState: coarse.initialState };
  }
  return { sampling: {}, initialState: fine.initialState };
}

const toDb = (x: number): Decibels => 20 * Math.log10(Math.max(x, 1e-300));
