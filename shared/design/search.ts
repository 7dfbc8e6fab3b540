// The option designer's search: enumerate every clipping network in a search space, compute each one
// with the engine's contract function (the profile CLI's own computation), rank by distance to a target.
// Pure TypeScript: runs in the CLI, the server and a browser Web Worker.
import { analyseOperatingPoint, resolveDevice, toContractOutput, type ContractInput, type ContractOutput } from '../engine/contract';
import { DEFAULT_ENERGY_GAP, DEFAULT_XTI } from '../engine/constants';
import type { DeviceModel } from '../engine/device';
import { EngineInputError } from '../engine/errors';
import type { ClippingNetwork, Topology } from '../engine/network';
import { findPreset } from '../engine/presets';
import { onsetDrive } from '../engine/profile';
import { DESIGN_LIMITS, designInputSchema, eSeriesValues, type DesignInput, type DesignTarget, type LevelTarget } from './schema';

/** One device of the search space, resolved: its position in the input's devices, display name and SPICE parameters. */
export interface SpaceDevice { index: number; name: string; model: DeviceModel }

/** The search space after parsing: the input and its distinct devices. */
export interface ParsedDesign { input: DesignInput; devices: SpaceDevice[] }

/** One side of a candidate: `count` devices of kind `device` (an index into the input's devices) in series. */
export interface SideChoice { device: number; name: string; count: number }

/** A computed candidate: `clipper` is a profile-contract clipper, `at` the profile CLI's output for it. */
export interface DesignCandidate {
  clipper: ClippingNetwork;
  distance: number;
  at: ContractOutput;
  strings: { positive: SideChoice | null; negative: SideChoice | null };
  /** Share of the distortion energy in even orders (0…1), from the same spectrum as `at`. */
  evenEnergyShare: number;
  /** With a second-drive target: the profile CLI's output at that gain, and its even share. */
  second?: ContractOutput & { evenEnergyShare: number };
  /** With an onset target: the drive rotation (0…1) where THD_F passes 1 %, null when it never does. */
  onsetDrive?: number | null;
}

export interface DesignResult {
  /** Candidates computed (all of them unless cancelled). */
  searched: number;
  /** Candidates in the space. */
  total: number;
  /** Candidates whose solve failed (the engine throws rather than return NaN); skipped. */
  failed: number;
  cancelled: boolean;
  /** The best `limit` candidates, by distance then enumeration order. */
  candidates: DesignCandidate[];
}

export interface SearchOptions {
  /** Called every `progressEvery` candidates and at the end, e.g. to move a progress bar. */
  onProgress?: (done: number, total: number) => void;
  progressEvery?: number;
  /** Checked between candidates; when aborted the search stops and returns what it has. */
  signal?: { readonly aborted: boolean };
  shouldStop?: () => boolean;
}

/**
 * Scale of one unit of distance per target quantity, used when a range is narrower than it (a range
 * of width zero is allowed: a target copied from an existing circuit).
 */
export const DISTANCE_FLOORS = { thdFPercent: 0.1, h2MinusH3Db: 1, evenSharePercent: 1, fundamentalPeakV: 0.01, onsetDrivePercent: 5 } as const;

type RangeKey = keyof typeof DISTANCE_FLOORS;
type Quantities = Partial<Record<RangeKey, number>>;

/** Points of the onset sweep, as in computeProfile. */
export const ONSET_SWEEP_POINTS = 25;
/** A candidate whose THD_F never reaches 1 % counts as onset one sweep step past the top: 100 + 100/24 %. */
export const ONSET_NEVER_PERCENT = 100 + 100 / (ONSET_SWEEP_POINTS - 1);

/** The measured quantities a target ranges over, for one computed operating point. */
export function targetQuantities(at: ContractOutput, evenEnergyShare: number): Record<keyof LevelTarget, number> {
  return {
    thdFPercent: at.thdF * 100,
    h2MinusH3Db: at.harmonics[1].dbc - at.harmonics[2].dbc,
    evenSharePercent: evenEnergyShare * 100,
    fundamentalPeakV: at.fundamentalPeakV,
  };
}

function rangesDistance(ranges: Partial<Record<RangeKey, [number, number]>>, values: Quantities): number {
  let d = 0;
  for (const key of Object.keys(DISTANCE_FLOORS) as RangeKey[]) {
    const r = ranges[key];
    const v = values[key];
    if (!r || v === undefined) continue;
    const [lo, hi] = r;
    const outside = v < lo ? lo - v : v > hi ? v - hi : 0;
    if (outside > 0) d += outside / Math.max(hi - lo, DISTANCE_FLOORS[key]);
  }
  return d;
}

/**
 * Distance of a candidate to the target: the sum over the target's ranges (at the reference drive, the
 * onset, and at the second drive) of
 *   (how far the value lies outside [lo, hi]) / max(hi − lo, floor),
 * with the floors in DISTANCE_FLOORS. It is 0 exactly when the value is inside every range, and one
 * unit means "one range-width outside", so quantities in different units add up comparably. An onset
 * that never happens counts as ONSET_NEVER_PERCENT.
 */
export function targetDistance(target: DesignTarget, values: Quantities, second?: Quantities): number {
  const { second: secondTarget, ...ranges } = target;
  return rangesDistance(ranges, values) + (secondTarget && second ? rangesDistance(secondTarget, second) : 0);
}

/** Same SPICE parameters (EG and XTI at their defaults when absent) = the same device for the engine. */
const modelKey = (m: DeviceModel) => [m.is, m.n, m.rs, m.eg ?? DEFAULT_ENERGY_GAP, m.xti ?? DEFAULT_XTI].join(' ');

/**
 * Devices with the same SPICE parameters give the same candidates, so the search keeps only the first
 * of each (a library often holds copies, e.g. one device per supplier's part). Callers that prefer one
 * copy, e.g. the best-stocked, list it first.
 */
export function distinctDevices(devices: SpaceDevice[]): SpaceDevice[] {
  const seen = new Set<string>();
  return devices.filter((d) => {
    const key = modelKey(d.model);
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

/** Parse and range-check design JSON; throws EngineInputError {path, message} like the profile contract. */
export function parseDesignInput(json: unknown): ParsedDesign {
  const parsed = designInputSchema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const path = issue.path.reduce<string>((p, k) => (typeof k === 'number' ? `${p}[${k}]` : p ? `${p}.${String(k)}` : String(k)), '');
    throw new EngineInputError(path, path ? `${path}: ${issue.message}` : issue.message);
  }
  const input = parsed.data;
  const devices = distinctDevices(input.devices.map((d, index): SpaceDevice => {
    const path = `devices[${index}]`;
    if (typeof d === 'string') return { index, name: d, model: { ...findPreset(d)!.model } };
    if ('preset' in d) return { index, name: d.name ?? d.preset, model: resolveDevice({ preset: d.preset }, path) };
    const { name, ...params } = d;
    return { index, name: name ?? `device ${index + 1}`, model: resolveDevice(params, path) };
  }));
  const total = countCandidates({ input, devices });
  if (total > DESIGN_LIMITS.candidates) {
    throw new EngineInputError('', overBoundMessage(total));
  }
  return { input, devices };
}

/** Why a space is refused, in words, e.g. "the search space holds 250 000 candidates; at most 200 000 …". */
export function overBoundMessage(total: number): string {
  return `the search space holds ${total} candidates; at most ${DESIGN_LIMITS.candidates} (fewer devices, a lower maxPerSide, fewer resistor or capacitor values, or one symmetry)`;
}

function resistorValues(input: DesignInput): number[] {
  const r = input.seriesOhms;
  if (r === undefined) return [];
  return Array.isArray(r) ? [...new Set(r)] : eSeriesValues(r.eSeries, r.min, r.max);
}

const capacitorValues = (input: DesignInput): number[] => [...new Set(input.capacitorFarads ?? [0])];

/**
 * (positive, negative) side pairs the symmetry choice allows; numbers index the distinct devices. A pair
 * and its mirror image (the sides swapped) give the same harmonic levels, THD and fundamental, only the
 * DC offset changes sign, so only the pair whose positive side comes first in the list of sides is kept.
 */
function sidePairs(input: DesignInput, deviceCount: number): [number, number, number, number][] {
  const sides: [number, number][] = [];
  for (let d = 0; d < deviceCount; d++) for (let c = 1; c <= input.maxPerSide; c++) sides.push([d, c]);
  const pairs: [number, number, number, number][] = [];
  for (let i = 0; i < sides.length; i++) {
    const [pd, pc] = sides[i];
    for (let j = i; j < sides.length; j++) {
      const [nd, nc] = sides[j];
      const same = i === j;
      if (input.symmetry === 'symmetric' && !same) continue;
      if (input.symmetry === 'asymmetric' && same) continue;
      pairs.push([pd, pc, nd, nc]);
    }
  }
  return pairs;
}

/**
 * Size of the space without mirror images, e.g. 2 distinct devices × up to 2 per side (s = 4 strings),
 * shunt with 3 resistors: s(s + 1)/2 · 3 = 30.
 */
export function countCandidates({ input, devices }: ParsedDesign): number {
  const s = devices.length * input.maxPerSide;
  const pairs = input.symmetry === 'symmetric' ? s : input.symmetry === 'asymmetric' ? (s * (s - 1)) / 2 : (s * (s + 1)) / 2;
  const caps = capacitorValues(input).length;
  let n = 0;
  for (const t of input.topologies) n += t === 'none' ? 1 : t === 'shunt' ? pairs * resistorValues(input).length * caps : pairs * caps;
  return n;
}

export interface Planned { clipper: ClippingNetwork; strings: DesignCandidate['strings'] }

/**
 * Every candidate in a fixed order: per topology (as listed), per resistor, per capacitor, per
 * (positive device, count) and (negative device, count), mirror images left out (see sidePairs).
 * A string is 1…maxPerSide devices of one kind.
 */
export function* enumerateCandidates(input: DesignInput, devices: SpaceDevice[]): Generator<Planned> {
  const pairs = sidePairs(input, devices.length);
  const base = { seriesOhms: 1, shuntFarads: 0, feedbackOhms: input.feedbackOhms ?? 1, groundOhms: input.groundOhms ?? 1, feedbackFarads: 0 };
  for (const topology of input.topologies as Topology[]) {
    if (topology === 'none') {
      yield { clipper: { topology, ...base, positive: [], negative: [] }, strings: { positive: null, negative: null } };
      continue;
    }
    for (const r of topology === 'shunt' ? resistorValues(input) : [1]) {
      for (const c of capacitorValues(input)) {
        for (const [pd, pc, nd, nc] of pairs) {
          const values = topology === 'shunt' ? { seriesOhms: r, shuntFarads: c } : { feedbackFarads: c };
          yield {
            clipper: {
              topology, ...base, ...values,
              positive: Array.from({ length: pc }, () => ({ ...devices[pd].model })),
              negative: Array.from({ length: nc }, () => ({ ...devices[nd].model })),
            },
            strings: {
              positive: { device: devices[pd].index, name: devices[pd].name, count: pc },
              negative: { device: devices[nd].index, name: devices[nd].name, count: nc },
            },
          };
        }
      }
    }
  }
}

/** The profile contract's input for one candidate clipper at the design's stage. */
export function contractInputFor(input: DesignInput, clipper: ClippingNetwork): ContractInput {
  return {
    toneHz: input.toneHz, inputPeakV: input.inputPeakV, driveGain: input.driveGain, railPeakV: input.railPeakV ?? null,
    clipper, temperatureC: input.temperatureC, harmonics: input.harmonics,
  };
}

/**
 * Compute one candidate: the operating point at the stage (always), at the second drive and the onset
 * sweep (when the target asks), then its distance. Throws when the engine cannot solve it.
 */
export function computeCandidate(input: DesignInput, planned: Planned): DesignCandidate {
  const { target } = input;
  const spectrum = analyseOperatingPoint(contractInputFor(input, planned.clipper));
  const at = toContractOutput(spectrum);
  const c: DesignCandidate = { ...planned, distance: 0, at, evenEnergyShare: spectrum.evenEnergyShare };
  const values: Partial<Record<keyof typeof DISTANCE_FLOORS, number>> = targetQuantities(at, spectrum.evenEnergyShare);
  let secondValues: Record<keyof LevelTarget, number> | undefined;
  if (target.second) {
    const s2 = analyseOperatingPoint({ ...contractInputFor(input, planned.clipper), driveGain: target.second.driveGain });
    c.second = { ...toContractOutput(s2), evenEnergyShare: s2.evenEnergyShare };
    secondValues = targetQuantities(c.second, s2.evenEnergyShare);
  }
  if (target.onsetDrivePercent && input.drive) {
    c.onsetDrive = onsetDrive({
      network: planned.clipper, toneHz: input.toneHz, temperatureC: input.temperatureC, referenceDrive: 0.5,
      drive: { ...input.drive, inputPeakV: input.inputPeakV, railPeakV: input.railPeakV ?? null },
    }, ONSET_SWEEP_POINTS);
    values.onsetDrivePercent = c.onsetDrive === null ? ONSET_NEVER_PERCENT : c.onsetDrive * 100;
  }
  c.distance = targetDistance(target, values, secondValues);
  return c;
}

/** Keep `list` sorted by (distance, order) and at most `limit` long. */
function keepBest(list: { c: DesignCandidate; order: number }[], item: { c: DesignCandidate; order: number }, limit: number): void {
  if (list.length >= limit && item.c.distance >= list[list.length - 1].c.distance) return;
  let i = list.length;
  while (i > 0 && list[i - 1].c.distance > item.c.distance) i--;
  list.splice(i, 0, item);
  if (list.length > limit) list.pop();
}

/** The search as steps: yields after every `chunk` candidates so an async caller can let messages in. */
function* searchSteps({ input, devices }: ParsedDesign, options: SearchOptions, chunk: number): Generator<void, DesignResult> {
  const total = countCandidates({ input, devices });
  const every = options.progressEvery ?? 256;
  const best: { c: DesignCandidate; order: number }[] = [];
  let searched = 0;
  let failed = 0;
  let cancelled = false;
  for (const planned of enumerateCandidates(input, devices)) {
    if (options.signal?.aborted || options.shouldStop?.()) { cancelled = true; break; }
    let computed: DesignCandidate | null = null;
    try {
      computed = computeCandidate(input, planned);
    } catch {
      failed++;
    }
    if (computed) keepBest(best, { c: computed, order: searched }, input.limit);
    searched++;
    if (searched % every === 0) options.onProgress?.(searched, total);
    if (searched % chunk === 0) yield;
  }
  options.onProgress?.(searched, total);
  return { searched, total, failed, cancelled, candidates: best.map((b) => b.c) };
}

/** Run a parsed search to the end (or until cancelled), e.g. designSearch(parseDesignInput(json)).candidates[0]. */
export function designSearch(parsed: ParsedDesign, options: SearchOptions = {}): DesignResult {
  const steps = searchSteps(parsed, options, Number.MAX_SAFE_INTEGER);
  for (;;) {
    const s = steps.next();
    if (s.done) return s.value;
  }
}

/**
 * The same search, giving the event loop a turn every `chunk` candidates: in a Web Worker this lets a
 * cancel message arrive (set the signal's flag from onmessage) while the search runs.
 */
export async function designSearchAsync(parsed: ParsedDesign, options: SearchOptions = {}, chunk = 64): Promise<DesignResult> {
  const steps = searchSteps(parsed, options, chunk);
  for (;;) {
    const s = steps.next();
    if (s.done) return s.value;
    await new Promise((resolve) => setTimeout(resolve, 0));
  }
}

/** The checking contract's output: {searched, candidates: [{clipper, distance, at, …}]}. */
export function runDesign(json: unknown, options: SearchOptions = {}): DesignResult {
  return designSearch(parseDesignInput(json), options);
}
