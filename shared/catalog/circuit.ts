/**
 * The one place a catalog clipping option becomes the harmonic engine's input.
 *
 * Everyone who shows or prints a profile calls these (storefront, listening preview, production,
 * spec sheets), so the same option always gives the same numbers:
 *
 *   optionCircuit(drive, option)            → CircuitSpec for computeProfile / driveSweep / transferCurve
 *   optionContractInput(drive, option, at?) → the engine CLI's contract JSON (npm run --silent profile)
 *                                             at one drive rotation (default: the revision's reference drive)
 *
 * `drive` is a model revision's drive stage as the catalog API returns it (camelCase, see DriveStageValues),
 * `option` an option's topology, network values (contract names: seriesOhms, shuntFarads, feedbackOhms,
 * groundOhms, feedbackFarads) and its device strings with SPICE parameters (is, n, rs, eg, xti).
 *
 * Mapping rules (why the numbers are what they are):
 * - The catalog stores the pot taper as 'audio' | 'linear'; the engine calls audio 'log'.
 * - The drive stage's supply limit is the op-amp swing of a stage biased at half supply:
 *   railPeakFromSupply(supplyV) = supplyV/2 − 1.5 V (3.0 V at 9 V, 7.5 V at 18 V).
 * - Tone 1 kHz and 27 °C (the engine's TNOM) unless given; 10 harmonics in the contract.
 * Pure code: no Node-only APIs, safe in the browser and a Web Worker.
 */
import { gainAtDrive, railPeakFromSupply, type CircuitSpec, type DriveStage } from '../engine/index';

/** A revision's drive-stage values, e.g. {minGain: 1, maxGain: 150, taper: 'audio', inputPeakV: 0.1, supplyV: 9, referenceDrive: 0.5}. */
export interface DriveStageValues {
  minGain: number;
  maxGain: number;
  taper: 'audio' | 'linear';
  inputPeakV: number;
  supplyV: number;
  referenceDrive: number;
}

/** One device of a string, SPICE parameters, e.g. {is: 2.52e-9, n: 1.752, rs: 0.568}. */
export interface StringDevice {
  is: number;
  n: number;
  rs: number;
  eg?: number | null;
  xti?: number | null;
}

export type OptionTopology = 'shunt' | 'feedback' | 'none';

/** Network values in the engine contract's names; absent values take the defaults below. */
export interface NetworkValues {
  seriesOhms?: number;
  shuntFarads?: number;
  feedbackOhms?: number;
  groundOhms?: number;
  feedbackFarads?: number;
}

/** What circuit() needs from a clipping option. */
export interface OptionCircuitSource {
  topology: OptionTopology;
  network: NetworkValues;
  positive: readonly StringDevice[];
  negative: readonly StringDevice[];
}

/** Defaults where an option leaves a value out: 2.2 kΩ series, 100 kΩ / 4.7 kΩ feedback, no capacitors. */
export const NETWORK_DEFAULTS: Required<NetworkValues> = {
  seriesOhms: 2200, shuntFarads: 0, feedbackOhms: 100_000, groundOhms: 4700, feedbackFarads: 0,
};

export const DEFAULT_TONE_HZ = 1000;
export const DEFAULT_TEMPERATURE_C = 27;
export const CONTRACT_HARMONICS = 10;

function device(d: StringDevice) {
  const out: { is: number; n: number; rs: number; eg?: number; xti?: number } = { is: d.is, n: d.n, rs: d.rs };
  if (d.eg !== undefined && d.eg !== null) out.eg = d.eg;
  if (d.xti !== undefined && d.xti !== null) out.xti = d.xti;
  return out;
}

/** The engine's drive stage for a revision, e.g. audio taper → 'log', 9 V → rail 3.0 V. */
export function engineDriveStage(drive: DriveStageValues): DriveStage {
  return {
    minGain: drive.minGain,
    maxGain: drive.maxGain,
    taper: drive.taper === 'linear' ? 'linear' : 'log',
    inputPeakV: drive.inputPeakV,
    railPeakV: railPeakFromSupply(drive.supplyV),
  };
}

/** The contract's `clipper` object for an option, e.g. {topology: 'shunt', seriesOhms: 2200, …, positive: [{is, n, rs}]}. */
export function engineClipper(option: OptionCircuitSource) {
  const n = { ...NETWORK_DEFAULTS, ...stripUndefined(option.network) };
  return {
    topology: option.topology,
    seriesOhms: n.seriesOhms,
    shuntFarads: n.shuntFarads,
    feedbackOhms: n.feedbackOhms,
    groundOhms: n.groundOhms,
    feedbackFarads: n.feedbackFarads,
    positive: option.positive.map(device),
    negative: option.negative.map(device),
  };
}

function stripUndefined(n: NetworkValues): NetworkValues {
  return Object.fromEntries(Object.entries(n ?? {}).filter(([, v]) => v !== undefined && v !== null)) as NetworkValues;
}

/** CircuitSpec for computeProfile(optionCircuit(drive, option)). */
export function optionCircuit(drive: DriveStageValues, option: OptionCircuitSource, toneHz = DEFAULT_TONE_HZ, temperatureC = DEFAULT_TEMPERATURE_C): CircuitSpec {
  return {
    clipper: engineClipper(option),
    drive: engineDriveStage(drive),
    toneHz,
    temperatureC,
    referenceDrive: drive.referenceDrive,
  };
}

/** The engine contract JSON at one drive rotation (default the reference drive), as `npm run --silent profile` reads it. */
export function optionContractInput(drive: DriveStageValues, option: OptionCircuitSource, rotation = drive.referenceDrive, toneHz = DEFAULT_TONE_HZ) {
  const stage = engineDriveStage(drive);
  return {
    toneHz,
    inputPeakV: drive.inputPeakV,
    driveGain: gainAtDrive(stage, rotation),
    railPeakV: stage.railPeakV as number,
    clipper: engineClipper(option),
    temperatureC: DEFAULT_TEMPERATURE_C,
    harmonics: CONTRACT_HARMONICS,
  };
}
export type ContractJson = ReturnType<typeof optionContractInput>;
