/**
 * Kneepoint harmonic engine — public API (pure TypeScript; runs in Node, the browser and a Web Worker).
 *
 * Contract (CLI and POST /api/profiles):
 *   validateContractInput(json: unknown): ContractInput          throws EngineInputError {message, path}
 *   computeOperatingPoint(input: ContractInput): ContractOutput  exactly the contract's output
 *   analyseOperatingPoint(input): Spectrum                       adds phase, even/odd share, RMS, crest factor
 *   runContract(json: unknown): ContractOutput                   validate + compute
 *   errorBody(err: unknown): {message, path}                     the contract's error shape for any thrown error
 * Profiles (catalog clipping option + model revision drive stage = CircuitSpec):
 *   computeProfile(spec, options?): HarmonicProfile   reference spectrum, 25-point sweep, onset, transfer, bands
 *   driveSweep(spec, points?), clippingOnset(sweep), onsetDrive(spec), transferCurve(spec, {drive, points, rangeV}?)
 *   monteCarlo(spec, {draws, seed, vfSigmaV, emissionSigma, resistorTolerance, capacitorTolerance}?): ToleranceBands
 *   monteCarloDraws(spec, options?): the seeded circuits it runs; DRAW_SAMPLING the draws' sampling where error allows
 *   perUnitDevices(network, measured), perUnitCircuit(spec, measured)   IS refit from measured Vf, N kept
 *   resolveCircuit(spec): Circuit, setupAtDrive(circuit, drive): StageSetup
 * Devices:
 *   DEVICE_PRESETS, findPreset(id), forwardVoltage(d, I, T?), forwardVoltageCard(d) → Vf at 1 mA and 10 mA,
 *   fitDevice(points), refitSaturationCurrent(d, vf, I, T?), saturationCurrentAt(d, T), stringVoltage(ds, I, T?)
 * Drive stage: gainAtDrive(stage, rotation), taperFraction(rotation, taper), railPeakFromSupply(supplyV, headroom?)
 * Low level: periodicOutput(setup, sampling?) → one steady-state period; staticTransfer(setup, inputs); analyse(samples, k)
 */
export * from './units';
export * from './constants';
export * from './errors';
export * from './device';
export * from './presets';
export * from './network';
export { periodicOutput, staticTransfer, type SamplingOptions } from './solver';
export * from './spectrum';
export * from './contract';
export * from './circuit';
export * from './profile';
export * from './montecarlo';
export * from './perunit';
export { mulberry32, normalSource, percentile } from './random';

import { EngineInputError, SolverError, type EngineErrorBody } from './errors';

/** The contract's error body for anything thrown by the engine, e.g. errorBody(err) = {message, path: "toneHz"}. */
export function errorBody(err: unknown): EngineErrorBody {
  if (err instanceof EngineInputError || err instanceof SolverError) return err.toJSON();
  return { message: err instanceof Error ? err.message : String(err), path: '' };
}
