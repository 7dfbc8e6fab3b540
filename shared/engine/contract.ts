// The stable outside contract: JSON in, validated field by field, and JSON out.
import { NOMINAL_TEMPERATURE_C } from './constants';
import { checkDevice, type DeviceModel } from './device';
import { EngineInputError, checkPositive, checkRange } from './errors';
import type { ClippingNetwork, StageSetup, Topology } from './network';
import { findPreset } from './presets';
import { periodicOutput, type SamplingOptions } from './solver';
import { analyse, type Spectrum } from './spectrum';
import type { Celsius, Decibels, Hertz, Ratio, Volts } from './units';

/** Validated contract input, e.g. a 1 kHz, 0.1 V tone at gain 20 into a silicon shunt pair. */
export interface ContractInput {
  toneHz: Hertz;
  inputPeakV: Volts;
  driveGain: Ratio;
  railPeakV: Volts | null;
  clipper: ClippingNetwork;
  temperatureC: Celsius;
  harmonics: number;
}

/** Contract output: peak amplitudes of the steady-state output; THD over the orders reported. */
export interface ContractOutput {
  fundamentalPeakV: Volts;
  dcV: Volts;
  harmonics: { order: number; peakV: Volts; dbc: Decibels }[];
  /** THD_F = √(Σ_{k≥2} V_k²) / V_1. */
  thdF: Ratio;
  /** THD_R = √(Σ_{k≥2} V_k²) / √(Σ_{k≥1} V_k²). */
  thdR: Ratio;
}

/** Bounds of every contract field; the solver is guaranteed to converge over all of them. */
export const CONTRACT_LIMITS = {
  toneHz: { min: 20, max: 20000 },
  inputPeakV: { max: 100 },
  driveGain: { max: 1e6 },
  railPeakV: { max: 1000 },
  temperatureC: { min: -55, max: 150 },
  harmonics: { min: 1, max: 50 },
  ohms: { max: 1e9 },
  farads: { min: 0, max: 1e-6 },
  stringLength: { max: 20 },
} as const;

const TOPOLOGIES: readonly Topology[] = ['shunt', 'feedback', 'none'];

type Json = Record<string, unknown>;

function isObject(x: unknown): x is Json {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function requireObject(x: unknown, path: string): Json {
  if (!isObject(x)) throw new EngineInputError(path, `${path || 'input'} must be a JSON object, got ${describe(x)}`);
  return x;
}

function describe(x: unknown): string {
  if (x === null) return 'null';
  if (Array.isArray(x)) return 'an array';
  if (typeof x === 'string') return `the string "${x.length > 40 ? `${x.slice(0, 40)}…` : x}"`;
  return typeof x === 'number' ? String(x) : typeof x;
}

function requireNumber(obj: Json, key: string, path: string): number {
  const p = path ? `${path}.${key}` : key;
  const v = obj[key];
  if (v === undefined) throw new EngineInputError(p, `${p} is required`);
  if (typeof v !== 'number') throw new EngineInputError(p, `${p} must be a number, got ${describe(v)}`);
  return v;
}

function optionalNumber(obj: Json, key: string, path: string): number | undefined {
  return obj[key] === undefined || obj[key] === null ? undefined : requireNumber(obj, key, path);
}

/** A device in a string: SPICE parameters, or a reference to a library preset, e.g. {preset: 'led-red'}. */
export type DeviceRef = DeviceModel | { is: number; n: number; rs?: number; eg?: number; xti?: number } | { preset: string };

/** Resolve and range-check one device reference, e.g. resolveDevice({preset: 'si-small-signal'}, 'x').is = 2.52e-9. */
export function resolveDevice(ref: unknown, path: string): DeviceModel {
  const o = requireObject(ref, path);
  if (o.preset !== undefined) {
    if (typeof o.preset !== 'string') throw new EngineInputError(`${path}.preset`, `${path}.preset must be a string, got ${describe(o.preset)}`);
    const preset = findPreset(o.preset);
    if (!preset) throw new EngineInputError(`${path}.preset`, `${path}.preset: unknown preset "${o.preset}"`);
    return { ...preset.model };
  }
  const d: DeviceModel = {
    is: requireNumber(o, 'is', path),
    n: requireNumber(o, 'n', path),
    rs: optionalNumber(o, 'rs', path) ?? 0,
  };
  const eg = optionalNumber(o, 'eg', path);
  const xti = optionalNumber(o, 'xti', path);
  if (eg !== undefined) d.eg = eg;
  if (xti !== undefined) d.xti = xti;
  return checkDevice(d, path);
}

function resolveString(x: unknown, path: string): DeviceModel[] {
  if (x === undefined || x === null) return [];
  if (!Array.isArray(x)) throw new EngineInputError(path, `${path} must be an array of devices, got ${describe(x)}`);
  if (x.length > CONTRACT_LIMITS.stringLength.max) {
    throw new EngineInputError(path, `${path} must hold ≤ ${CONTRACT_LIMITS.stringLength.max} devices, got ${x.length}`);
  }
  return x.map((d, i) => resolveDevice(d, `${path}[${i}]`));
}

function ohms(o: Json, key: string, path: string, required: boolean): number {
  const p = `${path}.${key}`;
  const v = required ? requireNumber(o, key, path) : optionalNumber(o, key, path);
  if (v === undefined) return 1;
  return checkPositive(v, p, CONTRACT_LIMITS.ohms.max);
}

function farads(o: Json, key: string, path: string): number {
  const v = optionalNumber(o, key, path);
  if (v === undefined) return 0;
  return checkRange(v, CONTRACT_LIMITS.farads.min, CONTRACT_LIMITS.farads.max, `${path}.${key}`);
}

/** Validate a clipping network (contract `clipper` shape, devices may name presets); throws EngineInputError. */
export function validateNetwork(x: unknown, path = 'clipper'): ClippingNetwork {
  const o = requireObject(x, path);
  const topology = o.topology;
  if (typeof topology !== 'string' || !TOPOLOGIES.includes(topology as Topology)) {
    throw new EngineInputError(`${path}.topology`, `${path}.topology must be one of ${TOPOLOGIES.join(', ')}, got ${describe(topology)}`);
  }
  const t = topology as Topology;
  return {
    topology: t,
    seriesOhms: ohms(o, 'seriesOhms', path, t === 'shunt'),
    shuntFarads: farads(o, 'shuntFarads', path),
    feedbackOhms: ohms(o, 'feedbackOhms', path, t === 'feedback'),
    groundOhms: ohms(o, 'groundOhms', path, t === 'feedback'),
    feedbackFarads: farads(o, 'feedbackFarads', path),
    positive: resolveString(o.positive, `${path}.positive`),
    negative: resolveString(o.negative, `${path}.negative`),
  };
}

/**
 * Validate contract JSON field by field, e.g. validateContractInput({toneHz: 1000, …}).harmonics = 10.
 * Throws EngineInputError with the field path (e.g. "clipper.positive[0].is") and the bound broken.
 */
export function validateContractInput(json: unknown): ContractInput {
  const o = requireObject(json, '');
  const toneHz = checkRange(requireNumber(o, 'toneHz', ''), CONTRACT_LIMITS.toneHz.min, CONTRACT_LIMITS.toneHz.max, 'toneHz');
  const inputPeakV = checkPositive(requireNumber(o, 'inputPeakV', ''), 'inputPeakV', CONTRACT_LIMITS.inputPeakV.max);
  const driveGain = checkPositive(requireNumber(o, 'driveGain', ''), 'driveGain', CONTRACT_LIMITS.driveGain.max);
  const rail = optionalNumber(o, 'railPeakV', '');
  const railPeakV = rail === undefined ? null : checkPositive(rail, 'railPeakV', CONTRACT_LIMITS.railPeakV.max);
  const t = optionalNumber(o, 'temperatureC', '');
  const temperatureC = t === undefined ? NOMINAL_TEMPERATURE_C : checkRange(t, CONTRACT_LIMITS.temperatureC.min, CONTRACT_LIMITS.temperatureC.max, 'temperatureC');
  const h = optionalNumber(o, 'harmonics', '') ?? 10;
  checkRange(h, CONTRACT_LIMITS.harmonics.min, CONTRACT_LIMITS.harmonics.max, 'harmonics');
  if (!Number.isInteger(h)) throw new EngineInputError('harmonics', `harmonics must be an integer, got ${h}`);
  if (o.clipper === undefined) throw new EngineInputError('clipper', 'clipper is required');
  const clipper = validateNetwork(o.clipper, 'clipper');
  return { toneHz, inputPeakV, driveGain, railPeakV, clipper, temperatureC, harmonics: h };
}

/** The solver's view of a contract input, e.g. stageFromContract(input).network.topology = 'shunt'. */
export function stageFromContract(input: ContractInput): StageSetup {
  return {
    toneHz: input.toneHz, inputPeakV: input.inputPeakV, driveGain: input.driveGain,
    railPeakV: input.railPeakV, network: input.clipper, temperatureC: input.temperatureC,
  };
}

/** Full spectrum at a contract operating point (adds phase, even/odd, RMS, crest), e.g. .thdF ≈ 0.29. */
export function analyseOperatingPoint(input: ContractInput, sampling: SamplingOptions = {}): Spectrum {
  return analyse(periodicOutput(stageFromContract(input), sampling), input.harmonics);
}

/** Exactly the contract output for a validated input, e.g. computeOperatingPoint(input).thdF ≈ 0.29. */
export function computeOperatingPoint(input: ContractInput, sampling: SamplingOptions = {}): ContractOutput {
  return toContractOutput(analyseOperatingPoint(input, sampling));
}

/** Reduce a rich spectrum to the contract's output fields. */
export function toContractOutput(s: Spectrum): ContractOutput {
  return {
    fundamentalPeakV: s.fundamentalPeakV,
    dcV: s.dcV,
    harmonics: s.harmonics.map((h) => ({ order: h.order, peakV: h.peakV, dbc: h.dbc })),
    thdF: s.thdF,
    thdR: s.thdR,
  };
}

/** Validate then compute: what the CLI and POST /api/profiles call, e.g. runContract(json).harmonics.length = 10. */
export function runContract(json: unknown): ContractOutput {
  return computeOperatingPoint(validateContractInput(json));
}
