// Tolerance bands: Monte Carlo over device spread and component tolerance with a seeded generator.
import { celsiusToKelvin, thermalVoltage, NOMINAL_TEMPERATURE_C } from './constants';
import { resolveCircuit, setupAtDrive, type Circuit, type CircuitSpec } from './circuit';
import type { DeviceModel } from './device';
import { checkRange } from './errors';
import type { ClippingNetwork } from './network';
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
  sampling?: SamplingOptions;
}

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

/** Monte Carlo tolerance bands of THD_F, H2 and H3 with a seeded mulberry32 generator, e.g. monteCarlo(c, {draws: 200, seed: 7}). */
export function monteCarlo(spec: CircuitSpec | Circuit, options: MonteCarloOptions = {}): ToleranceBands {
  const c = resolveCircuit(spec);
  const draws = checkRange(options.draws ?? 200, 1, 100000, 'draws');
  const seed = options.seed ?? 1;
  const vfSigma = checkRange(options.vfSigmaV ?? 0.01, 0, 0.5, 'vfSigmaV');
  const nSigma = checkRange(options.emissionSigma ?? 0.01, 0, 0.3, 'emissionSigma');
  const rTol = checkRange(options.resistorTolerance ?? 0.05, 0, 0.5, 'resistorTolerance');
  const cTol = checkRange(options.capacitorTolerance ?? 0.1, 0, 0.5, 'capacitorTolerance');
  const drive = checkRange(options.drive ?? c.referenceDrive, 0, 1, 'drive');
  const uniform = mulberry32(seed);
  const normal = normalSource(uniform);
  const vt = thermalVoltage(celsiusToKelvin(NOMINAL_TEMPERATURE_C));
  const spreadDevice = (d: DeviceModel): DeviceModel => {
    const n = d.n * Math.max(0.5 / d.n, 1 + nSigma * normal());
    // A Vf shift ΔV at fixed current is IS·exp(−ΔV/(N·Vt)).
    const is = d.is * Math.exp(-(vfSigma * normal()) / (n * vt));
    return { ...d, n: Math.min(10, n), is };
  };
  const spread = (x: number, tol: number): number => x * (1 + tol * (2 * uniform() - 1));
  const thd: number[] = [];
  const h2: Decibels[] = [];
  const h3: Decibels[] = [];
  const base = setupAtDrive(c, drive);
  // Every draw starts its periodic steady-state search from the nominal circuit's state.
  const nominal = steadyState(base, options.sampling ?? {}).initialState;
  for (let i = 0; i < draws; i++) {
    const n = c.network;
    const network: ClippingNetwork = {
      ...n,
      seriesOhms: spread(n.seriesOhms, rTol), feedbackOhms: spread(n.feedbackOhms, rTol), groundOhms: spread(n.groundOhms, rTol),
      shuntFarads: spread(n.shuntFarads, cTol), feedbackFarads: spread(n.feedbackFarads, cTol),
      positive: n.positive.map(spreadDevice), negative: n.negative.map(spreadDevice),
    };
    const s = analyse(steadyState({ ...base, network }, options.sampling ?? {}, nominal).samples, Math.max(3, options.harmonics ?? 10));
    thd.push(s.thdF); h2.push(s.harmonics[1].dbc); h3.push(s.harmonics[2].dbc);
  }
  return { draws, seed, drive, thdF: band(thd), h2Dbc: band(h2), h3Dbc: band(h3) };
}
