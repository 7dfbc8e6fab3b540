// The option designer's input: a drive stage, a device list, a search space and a target sound.
// One zod schema, used by the design CLI, the browser worker and the screen's form.
import { z } from 'zod';
import { CONTRACT_LIMITS } from '../engine/contract';
import { gainAtDrive } from '../engine/network';
import { findPreset } from '../engine/presets';

/**
 * Upper bounds that keep one search finite. The cost bound is the number of candidates (200 000); the
 * device count (500) only bounds the input's size, so a whole library is searched whenever its space fits.
 */
export const DESIGN_LIMITS = { devices: 500, maxPerSide: 6, resistorValues: 60, capacitorValues: 12, candidates: 200_000, limit: 200 } as const;

/** Standard E-series mantissas (IEC 60063): E6, E12 and E24. */
export const E_SERIES = {
  E6: [1.0, 1.5, 2.2, 3.3, 4.7, 6.8],
  E12: [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2],
  E24: [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1],
} as const;
export type ESeriesName = keyof typeof E_SERIES;

/** E-series values within [min, max] ohms, e.g. eSeriesValues('E6', 1000, 4700) = [1000, 1500, 2200, 3300, 4700]. */
export function eSeriesValues(series: ESeriesName, min: number, max: number): number[] {
  const out: number[] = [];
  for (let decade = 1; decade <= 1e9; decade *= 10) {
    for (const m of E_SERIES[series]) {
      // Round to the mantissa's two significant figures so 2.2·1000 is exactly 2200.
      const v = Math.round(m * 10 * decade) / 10;
      if (v >= min && v <= max) out.push(v);
    }
  }
  return out;
}

const finite = (label: string) => z.number({ error: `${label} must be a number` }).refine(Number.isFinite, `${label} must be finite`);
const ohms = (label: string) => finite(label).positive(`${label} must be > 0`).max(CONTRACT_LIMITS.ohms.max, `${label} must be ≤ ${CONTRACT_LIMITS.ohms.max}`);
const range = (label: string) => z.tuple([finite(`${label} low end`), finite(`${label} high end`)], { error: `${label} must be [low, high]` })
  .refine(([lo, hi]) => lo <= hi, `${label}: the low end must not exceed the high end`);

/** A device: a preset id ("led-red"), {preset}, or SPICE parameters with an optional display name. */
const deviceSchema = z.union([
  z.string().refine((s) => findPreset(s) !== undefined, { error: (i) => `unknown preset "${String(i.input).slice(0, 40)}"` }),
  z.object({ preset: z.string(), name: z.string().max(80).optional() }).strict()
    .refine((d) => findPreset(d.preset) !== undefined, { error: 'unknown preset', path: ['preset'] }),
  z.object({ name: z.string().max(80).optional(), is: z.number(), n: z.number(), rs: z.number().optional(), eg: z.number().optional(), xti: z.number().optional() }).strict(),
], { error: 'a device is a preset id or {is, n, rs?}' });

const resistorsSchema = z.union([
  z.array(ohms('seriesOhms[]')).min(1, 'give at least one value').max(DESIGN_LIMITS.resistorValues, `at most ${DESIGN_LIMITS.resistorValues} values`),
  z.object({ eSeries: z.enum(['E6', 'E12', 'E24']), min: ohms('min'), max: ohms('max') }).strict()
    .refine((r) => r.min <= r.max, 'min must not exceed max')
    .refine((r) => eSeriesValues(r.eSeries, r.min, r.max).length > 0, 'no E-series value lies in that range'),
], { error: `seriesOhms is a list of 1…${DESIGN_LIMITS.resistorValues} resistances or {eSeries: "E6"|"E12"|"E24", min, max}` });

/** The ranges a target can set at one drive level. */
const levelRanges = {
  /** THD_F (√(Σ_{k≥2} V_k²)/V_1) in percent. */
  thdFPercent: range('thdFPercent').optional(),
  /** H2 level minus H3 level, dB (positive = even-dominant). */
  h2MinusH3Db: range('h2MinusH3Db').optional(),
  /** Share of the distortion energy in even orders, percent. */
  evenSharePercent: range('evenSharePercent').optional(),
  /** Peak of the output's fundamental, volts. */
  fundamentalPeakV: range('fundamentalPeakV').optional(),
};
const someRange = (t: object) => Object.values(t).some((v) => Array.isArray(v));

/** Ranges at a second drive gain, e.g. {driveGain: 120, thdFPercent: [20, 40]}. */
export const secondLevelSchema = z.object({
  driveGain: finite('second.driveGain').positive('second.driveGain must be > 0').max(CONTRACT_LIMITS.driveGain.max),
  ...levelRanges,
}).strict().refine(someRange, 'give at least one range at the second drive');

export const designTargetSchema = z.object({
  ...levelRanges,
  /**
   * Clipping onset: the drive control's rotation, in % (0…100), where THD_F passes 1 %, found as the
   * profile finds it (a 25-point sweep over the control, interpolated). Needs the input's `drive`.
   */
  onsetDrivePercent: range('onsetDrivePercent').optional(),
  second: secondLevelSchema.optional(),
}).strict().refine((t) => someRange(t) || t.second !== undefined, 'give at least one target range');
export type DesignTarget = z.infer<typeof designTargetSchema>;
export type DriveControl = z.infer<typeof driveControlSchema>;
export type LevelTarget = Omit<DesignTarget, 'onsetDrivePercent' | 'second'>;

/** The drive control of the stage (its gain law), needed for an onset target, e.g. {minGain: 1, maxGain: 200, taper: 'log'}. */
const driveControlSchema = z.object({
  minGain: finite('drive.minGain').positive().max(CONTRACT_LIMITS.driveGain.max),
  maxGain: finite('drive.maxGain').positive().max(CONTRACT_LIMITS.driveGain.max),
  taper: z.enum(['linear', 'log']),
}).strict().refine((d) => d.minGain <= d.maxGain, { error: 'drive.maxGain must be ≥ drive.minGain', path: ['maxGain'] });

export const designInputSchema = z.object({
  toneHz: finite('toneHz').min(CONTRACT_LIMITS.toneHz.min).max(CONTRACT_LIMITS.toneHz.max),
  inputPeakV: finite('inputPeakV').positive().max(CONTRACT_LIMITS.inputPeakV.max),
  driveGain: finite('driveGain').positive().max(CONTRACT_LIMITS.driveGain.max),
  railPeakV: finite('railPeakV').positive().max(CONTRACT_LIMITS.railPeakV.max).nullable().optional(),
  temperatureC: finite('temperatureC').min(CONTRACT_LIMITS.temperatureC.min).max(CONTRACT_LIMITS.temperatureC.max).default(27),
  harmonics: z.number().int().min(3, 'harmonics must be ≥ 3 (H2 − H3 needs them)').max(CONTRACT_LIMITS.harmonics.max).default(10),
  devices: z.array(deviceSchema).min(1, 'give at least one device').max(DESIGN_LIMITS.devices, `at most ${DESIGN_LIMITS.devices} devices`),
  maxPerSide: z.number().int().min(1).max(DESIGN_LIMITS.maxPerSide),
  symmetry: z.enum(['any', 'symmetric', 'asymmetric']).default('any'),
  topologies: z.array(z.enum(['shunt', 'feedback', 'none'])).min(1).max(3)
    .refine((t) => new Set(t).size === t.length, 'list each topology once'),
  seriesOhms: resistorsSchema.optional(),
  feedbackOhms: ohms('feedbackOhms').optional(),
  groundOhms: ohms('groundOhms').optional(),
  /** Capacitor values to try across the devices (0 = none), farads; default [0]. */
  capacitorFarads: z.array(finite('capacitorFarads[]').min(CONTRACT_LIMITS.farads.min).max(CONTRACT_LIMITS.farads.max))
    .min(1).max(DESIGN_LIMITS.capacitorValues).optional(),
  /** The drive control, for an onset target. */
  drive: driveControlSchema.optional(),
  target: designTargetSchema,
  limit: z.number().int().min(1).max(DESIGN_LIMITS.limit).default(10),
}).strict()
  .refine((d) => d.target.onsetDrivePercent === undefined || d.drive !== undefined, { error: 'drive {minGain, maxGain, taper} is required for an onset target', path: ['drive'] })
  .refine((d) => !d.topologies.includes('shunt') || d.seriesOhms !== undefined, { error: 'seriesOhms is required for the shunt topology', path: ['seriesOhms'] })
  .refine((d) => !d.topologies.includes('feedback') || d.feedbackOhms !== undefined, { error: 'feedbackOhms is required for the feedback topology', path: ['feedbackOhms'] })
  .refine((d) => !d.topologies.includes('feedback') || d.groundOhms !== undefined, { error: 'groundOhms is required for the feedback topology', path: ['groundOhms'] });
export type DesignInput = z.infer<typeof designInputSchema>;
export type DesignInputJson = z.input<typeof designInputSchema>;

const num = (label: string) => z.coerce.number({ error: `Enter ${label} as a number` }).refine(Number.isFinite, `Enter ${label} as a number`);
const optionalNum = z.union([z.literal('').transform(() => undefined), z.coerce.number().refine(Number.isFinite, 'Enter a number')]).optional();

/**
 * The screen's form: the target and the search space in the owner's terms; `designInputFromForm` turns
 * it into a DesignInput for a revision's stage, and the worker validates that with designInputSchema.
 */
export const designFormSchema = z.object({
  thdLo: num('the lowest THD_F').min(0, 'Cannot be negative'),
  thdHi: num('the highest THD_F').min(0, 'Cannot be negative').max(100, 'At most 100 %'),
  h2h3Lo: optionalNum,
  h2h3Hi: optionalNum,
  v1Lo: optionalNum,
  v1Hi: optionalNum,
  onsetLo: optionalNum,
  onsetHi: optionalNum,
  secondDrive: optionalNum,
  secondThdLo: optionalNum,
  secondThdHi: optionalNum,
  /** Capacitor part ids (checkbox values) to try across the devices, besides none. */
  caps: z.union([z.array(z.string()), z.literal(false), z.string()]).optional()
    .transform((v) => (v === undefined || v === false ? [] : Array.isArray(v) ? v : [v]).map(Number)),
  space: z.enum(['stocked', 'library']),
  symmetry: z.enum(['any', 'symmetric', 'asymmetric']),
  maxPerSide: z.coerce.number().int().min(1, 'At least 1').max(4, 'At most 4 per side on the screen'),
  shunt: z.boolean(),
  feedback: z.boolean(),
  eSeries: z.enum(['E6', 'E12', 'E24']),
  seriesMin: num('the smallest resistor').positive('Above zero').max(1e7),
  seriesMax: num('the largest resistor').positive('Above zero').max(1e7),
  feedbackOhms: num('Rf').positive('Above zero').max(1e9),
  groundOhms: num('Rg').positive('Above zero').max(1e9),
})
  .refine((f) => f.thdLo <= f.thdHi, { error: 'The low end must not exceed the high end', path: ['thdHi'] })
  .refine((f) => f.seriesMin <= f.seriesMax, { error: 'The smallest must not exceed the largest', path: ['seriesMax'] })
  .refine((f) => (f.h2h3Lo === undefined) === (f.h2h3Hi === undefined), { error: 'Give both ends or neither', path: ['h2h3Hi'] })
  .refine((f) => (f.v1Lo === undefined) === (f.v1Hi === undefined), { error: 'Give both ends or neither', path: ['v1Hi'] })
  .refine((f) => (f.onsetLo === undefined) === (f.onsetHi === undefined), { error: 'Give both ends or neither', path: ['onsetHi'] })
  .refine((f) => f.onsetLo === undefined || (f.onsetLo >= 0 && f.onsetHi! <= 100 && f.onsetLo <= f.onsetHi!), { error: 'Between 0 and 100 %, low end first', path: ['onsetHi'] })
  .refine((f) => f.secondDrive === undefined || (f.secondDrive >= 0 && f.secondDrive <= 100), { error: 'Between 0 and 100 %', path: ['secondDrive'] })
  .refine((f) => (f.secondDrive === undefined) === (f.secondThdLo === undefined) && (f.secondThdLo === undefined) === (f.secondThdHi === undefined),
    { error: 'Give the second drive and both ends of its THD_F range, or none of them', path: ['secondThdHi'] })
  .refine((f) => f.secondThdLo === undefined || (f.secondThdLo >= 0 && f.secondThdLo <= f.secondThdHi!), { error: 'The low end must not exceed the high end', path: ['secondThdHi'] })
  .refine((f) => f.shunt || f.feedback, { error: 'Choose at least one topology', path: ['feedback'] });
export type DesignForm = z.infer<typeof designFormSchema>;

/** The stage a revision gives the search: tone, input level, the gain at the reference drive, the rail. */
export interface DesignStage { toneHz: number; inputPeakV: number; driveGain: number; railPeakV: number | null; temperatureC: number }

/**
 * A design input from the screen's form, e.g. for the devices in stock, 1…2 per side, E12 1 k…10 k.
 * `control` is the revision's drive control (for the onset and the second drive, given in % of its rotation);
 * `capacitorFarads` the chosen capacitors' values (none is always tried too).
 */
export function designInputFromForm(
  f: DesignForm, stage: DesignStage, devices: { name: string; is: number; n: number; rs: number; eg?: number; xti?: number }[],
  control: DriveControl, capacitorFarads: number[] = [],
): DesignInputJson {
  const pair = (lo?: number, hi?: number): [number, number] | undefined => (lo === undefined || hi === undefined ? undefined : [lo, hi]);
  const secondThd = pair(f.secondThdLo, f.secondThdHi);
  const second = f.secondDrive === undefined || !secondThd ? undefined
    : { driveGain: gainAtDrive({ ...control, inputPeakV: stage.inputPeakV, railPeakV: stage.railPeakV }, f.secondDrive / 100), thdFPercent: secondThd };
  return {
    ...stage, harmonics: 10, devices, maxPerSide: f.maxPerSide, symmetry: f.symmetry,
    topologies: [...(f.shunt ? ['shunt' as const] : []), ...(f.feedback ? ['feedback' as const] : [])],
    seriesOhms: { eSeries: f.eSeries, min: f.seriesMin, max: f.seriesMax },
    feedbackOhms: f.feedbackOhms, groundOhms: f.groundOhms,
    ...(capacitorFarads.length > 0 ? { capacitorFarads: [0, ...capacitorFarads] } : {}),
    drive: control,
    target: {
      thdFPercent: [f.thdLo, f.thdHi], h2MinusH3Db: pair(f.h2h3Lo, f.h2h3Hi), fundamentalPeakV: pair(f.v1Lo, f.v1Hi),
      onsetDrivePercent: pair(f.onsetLo, f.onsetHi), second,
    },
    limit: 10,
  };
}
