import { z } from 'zod';
import { id, str, text } from './common';
import { boolParam, listQuery } from './list';

// Request shapes of the catalog: parts and stock, devices, models, revisions, BOM, steps, options.
// The same schemas validate the forms (react-hook-form + zodResolver) and the server (parseWith).

export const PART_CATEGORIES = ['resistor', 'capacitor', 'ic', 'transistor', 'diode', 'led', 'pot', 'jack', 'switch', 'enclosure', 'pcb', 'hardware', 'wire', 'knob', 'packaging', 'other'] as const;
export const SKILLS = ['through-hole', 'smd-rework', 'device-matching', 'enclosure', 'final-check'] as const;
export const DEVICE_KINDS = ['silicon', 'schottky', 'germanium', 'led', 'other'] as const;

/** For PATCH bodies: every field optional and no defaults filled in (a default would overwrite stored values). */
function patchOf<T extends z.ZodRawShape>(schema: z.ZodObject<T>) {
  const shape: Record<string, z.ZodType> = {};
  for (const [key, field] of Object.entries(schema.shape)) {
    const f = field as z.ZodType;
    shape[key] = (f instanceof z.ZodDefault ? (f.unwrap() as z.ZodType) : f).optional();
  }
  return z.object(shape) as unknown as z.ZodObject<{ [K in keyof T]: z.ZodOptional<T[K]> }>;
}

const whole = (label: string, max = 1_000_000) =>
  z.coerce.number({ message: `Enter ${label} as a number` }).int(`${label} must be a whole number`).min(0, `${label} cannot be negative`).max(max, `${label} must be at most ${max}`);

export const partSchema = z.object({
  partNumber: str().trim().min(1, 'Enter the internal part number').max(40, 'Use at most 40 characters').regex(/^[A-Za-z0-9._\-/]+$/, 'Letters, digits and . _ - / only'),
  category: z.enum(PART_CATEGORIES, { message: 'Choose a category' }),
  value: text(80).default(''),
  package: text(60).default(''),
  manufacturerPartNumber: text(80).default(''),
  supplierId: id('Choose the supplier').nullable().default(null),
  unitCostCents: whole('Unit cost', 10_000_000),
  leadTimeDays: whole('Lead time', 365),
  reorderPoint: whole('Reorder point'),
  binLocation: text(40).default(''),
  notes: text(2000).default(''),
});
export type PartInput = z.infer<typeof partSchema>;
export const partUpdateSchema = patchOf(partSchema);

export const partListQuerySchema = listQuery(['partNumber', 'category', 'value', 'unitCostCents', 'onHand', 'available', 'reorderPoint', 'binLocation'] as const, { sort: 'partNumber', dir: 'asc' }, {
  category: z.enum(PART_CATEGORIES, { message: 'Choose a category from the list' }).optional().or(z.literal('').transform(() => undefined)),
  lowStock: boolParam.optional(),
});
export type PartListQuery = z.infer<typeof partListQuerySchema>;

/** Staff record these by hand; reserve/release/consume also come from production. */
export const MOVEMENT_KINDS = ['receive', 'adjust', 'reserve', 'release', 'consume', 'return'] as const;
export const movementSchema = z.object({
  kind: z.enum(MOVEMENT_KINDS, { message: 'Choose what happened' }),
  // Signed for adjust (a count correction), positive for the others.
  quantity: z.coerce.number({ message: 'Enter a quantity' }).int('Quantity must be a whole number').refine((q) => q !== 0, 'Quantity cannot be zero').refine((q) => Math.abs(q) <= 100_000, 'At most 100000 at once'),
  reason: str().trim().min(1, 'Say why').max(300),
  reference: text(80).default(''),
  batchId: id('Not a valid batch id').optional(),
  unitId: id('Not a valid unit id').optional(),
}).refine((m) => m.kind === 'adjust' || m.quantity > 0, { message: 'Quantity must be positive (only an adjustment can be negative)', path: ['quantity'] });
export type MovementInput = z.infer<typeof movementSchema>;

export const receiveSchema = z.object({
  supplierId: id('Choose the supplier'),
  reference: str().trim().min(1, 'Enter the delivery note number').max(80),
  lines: z.array(z.object({
    partId: id('Choose a part'),
    quantity: z.coerce.number({ message: 'Enter a quantity' }).int('Whole numbers only').min(1, 'At least 1').max(100_000, 'At most 100000'),
  })).min(1, 'Add at least one line').max(200),
});
export type ReceiveInput = z.infer<typeof receiveSchema>;

const positive = (label: string) => z.coerce.number({ message: `Enter ${label}` }).positive(`${label} must be above zero`);

export const customDeviceSchema = z.object({
  name: str().trim().min(1, 'Name the device').max(120),
  kind: z.enum(DEVICE_KINDS, { message: 'Choose the kind' }),
  source: z.enum(['spice', 'datasheet']),
  is: positive('IS').max(1, 'IS must be at most 1 A').optional(),
  n: z.coerce.number().min(0.5, 'N must be at least 0.5').max(10, 'N must be at most 10').optional(),
  rs: z.coerce.number().min(0, 'RS cannot be negative').max(1e6).default(0),
  points: z.array(z.object({ vf: positive('Vf').max(100), currentMa: positive('the current').max(1000) })).min(2, 'Give two or three points').max(3, 'Give two or three points').optional(),
  partId: id('Choose a part').nullable().default(null),
  provenance: text(500).default(''),
}).superRefine((d, ctx) => {
  if (d.source === 'spice') {
    if (d.is === undefined) ctx.addIssue({ code: 'custom', path: ['is'], message: 'Enter IS' });
    if (d.n === undefined) ctx.addIssue({ code: 'custom', path: ['n'], message: 'Enter N' });
  } else if (!d.points) ctx.addIssue({ code: 'custom', path: ['points'], message: 'Give two or three points' });
});
export type CustomDeviceInput = z.infer<typeof customDeviceSchema>;
export const deviceLinkSchema = z.object({ partId: id('Choose a part').nullable() });

export const modelSchema = z.object({
  name: str().trim().min(1, 'Name the pedal').max(80),
  sku: str().trim().min(1, 'Enter the SKU').max(40).regex(/^[A-Z0-9-]+$/, 'Capital letters, digits and - only'),
  description: text(2000).default(''),
  basePriceCents: whole('Base price', 100_000_000),
  published: z.boolean().default(false),
});
export type ModelInput = z.infer<typeof modelSchema>;
export const modelUpdateSchema = patchOf(modelSchema);

export const driveStageSchema = z.object({
  label: text(80).optional(),
  notes: text(2000).optional(),
  minGain: positive('the minimum gain').max(1e5).optional(),
  maxGain: positive('the maximum gain').max(1e5).optional(),
  taper: z.enum(['audio', 'linear'], { message: 'Choose audio or linear' }).optional(),
  inputPeakV: positive('the input peak').max(10, 'At most 10 V').optional(),
  supplyV: z.union([z.literal(9), z.literal(18)], { message: 'Supply is 9 V or 18 V' }).optional(),
  referenceDrive: z.coerce.number().min(0, 'Between 0 and 1').max(1, 'Between 0 and 1').optional(),
});
export type DriveStageInput = z.infer<typeof driveStageSchema>;

export const bomLineSchema = z.object({
  partId: id('Choose a part'),
  quantity: z.coerce.number({ message: 'Enter a quantity' }).int('Whole numbers only').min(1, 'At least 1').max(10_000),
  designators: text(2000).default(''),
  notes: text(500).default(''),
  needsLot: z.boolean().default(false),
});
export type BomLineInput = z.infer<typeof bomLineSchema>;

export const buildStepSchema = z.object({
  title: str().trim().min(1, 'Give the step a title').max(120),
  instructions: text(4000).default(''),
  standardMinutes: z.coerce.number({ message: 'Enter minutes' }).int('Whole minutes').min(1, 'At least 1 minute').max(600, 'At most 600 minutes'),
  skill: z.enum(SKILLS, { message: 'Choose the skill' }),
  soldering: z.boolean().default(false),
  safetyNote: text(2000).default(''),
});
export type BuildStepInput = z.infer<typeof buildStepSchema>;

const ohms = (label: string) => z.coerce.number({ message: `Enter ${label}` }).positive(`${label} must be above zero`).max(1e9);
const farads = z.coerce.number().min(0, 'Cannot be negative').max(1e-6, 'At most 1 µF');

export const optionSchema = z.object({
  code: str().trim().min(1, 'Enter a short code').max(20).regex(/^[A-Z0-9]+$/, 'Capital letters and digits only'),
  name: str().trim().min(1, 'Name the option').max(80),
  description: text(2000).default(''),
  topology: z.enum(['shunt', 'feedback'], { message: 'Choose shunt or feedback' }),
  network: z.object({
    seriesOhms: ohms('the series resistor').optional(),
    shuntFarads: farads.optional(),
    feedbackOhms: ohms('the feedback resistor').optional(),
    groundOhms: ohms('the ground resistor').optional(),
    feedbackFarads: farads.optional(),
  }).default({}),
  positive: z.array(id('Choose a device from the library')).min(1, 'Choose at least one device').max(6, 'At most 6 in series'),
  negative: z.array(id('Choose a device from the library')).max(6, 'At most 6 in series'),
  surchargeCents: whole('Surcharge', 10_000_000),
  published: z.boolean().default(false),
});
export type OptionInput = z.infer<typeof optionSchema>;
export const optionUpdateSchema = patchOf(optionSchema);

/** POST /api/models/:id/revisions: the revision the new one copies. */
export const newRevisionSchema = z.object({ fromRevisionId: id('Choose the revision to copy') });

/** BOM CSV upload: the one documented column format (see DEVELOPERS.md, "BOM CSV"). */
export const BOM_CSV_COLUMNS = { partNumber: 'part number', quantity: 'quantity', designators: 'designators', notes: 'notes' } as const;
export const BOM_CSV_MAX_BYTES = 256 * 1024;
export const PHOTO_MAX_BYTES = 2 * 1024 * 1024;
export const PHOTO_TYPES = ['image/png', 'image/jpeg', 'image/webp'] as const;
