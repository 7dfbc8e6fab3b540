// A clipping option on a model revision's drive stage: the input the profile functions share.
import { NOMINAL_TEMPERATURE_C } from './constants';
import { validateNetwork } from './contract';
import { EngineInputError, checkPositive, checkRange } from './errors';
import { gainAtDrive, type ClippingNetwork, type DriveStage, type StageSetup } from './network';
import type { Celsius, Hertz, Ratio } from './units';

/**
 * A circuit as the catalog stores it, e.g. {clipper: {topology: 'shunt', seriesOhms: 2200, positive: [{preset: 'si-small-signal'}], …},
 * drive: {minGain: 1, maxGain: 200, taper: 'log', inputPeakV: 0.1, railPeakV: 3}}. Devices may name presets.
 */
export interface CircuitSpec {
  clipper: unknown;
  drive: DriveStage;
  toneHz?: Hertz;
  temperatureC?: Celsius;
  /** Drive rotation 0..1 at which the reference operating point (and tolerance bands) are read; default 0.5. */
  referenceDrive?: Ratio;
}

/** A validated circuit with every device resolved. */
export interface Circuit {
  network: ClippingNetwork;
  drive: DriveStage;
  toneHz: Hertz;
  temperatureC: Celsius;
  referenceDrive: Ratio;
}

/** Validate a circuit spec (same rules and error paths as the contract), e.g. resolveCircuit(spec).toneHz = 1000. */
export function resolveCircuit(spec: CircuitSpec | Circuit): Circuit {
  if ('network' in spec) return spec;
  const d = spec.drive as unknown as Record<string, unknown> | undefined;
  if (typeof d !== 'object' || d === null) throw new EngineInputError('drive', 'drive is required');
  const drive: DriveStage = {
    minGain: checkPositive(d.minGain as number, 'drive.minGain', 1e6),
    maxGain: checkPositive(d.maxGain as number, 'drive.maxGain', 1e6),
    taper: d.taper === 'log' ? 'log' : d.taper === 'linear' ? 'linear' : badTaper(d.taper),
    inputPeakV: checkPositive(d.inputPeakV as number, 'drive.inputPeakV', 100),
    railPeakV: d.railPeakV === null || d.railPeakV === undefined ? null : checkPositive(d.railPeakV as number, 'drive.railPeakV', 1000),
  };
  if (drive.maxGain < drive.minGain) {
    throw new EngineInputError('drive.maxGain', `drive.maxGain must be ≥ drive.minGain (${drive.minGain}), got ${drive.maxGain}`);
  }
  return {
    network: validateNetwork(spec.clipper, 'clipper'),
    drive,
    toneHz: checkRange(spec.toneHz ?? 1000, 20, 20000, 'toneHz'),
    temperatureC: checkRange(spec.temperatureC ?? NOMINAL_TEMPERATURE_C, -55, 150, 'temperatureC'),
    referenceDrive: checkRange(spec.referenceDrive ?? 0.5, 0, 1, 'referenceDrive'),
  };
}

function badTaper(x: unknown): never {
  throw new EngineInputError('drive.taper', `drive.taper must be "linear" or "log", got ${JSON.stringify(x)}`);
}

/** The solver setup at a drive rotation, e.g. setupAtDrive(circuit, 0.5).driveGain = 20.9 for 1..200 log. */
export function setupAtDrive(c: Circuit, rotation: Ratio): StageSetup {
  return {
    toneHz: c.toneHz, inputPeakV: c.drive.inputPeakV, driveGain: gainAtDrive(c.drive, rotation),
    railPeakV: c.drive.railPeakV, network: c.network, temperatureC: c.temperatureC,
  };
}
