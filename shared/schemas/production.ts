import { z } from 'zod';
import { dateSchema, id as idOf, str } from './common';
import { boolParam, listQuery } from './list';
import { BATCH_STATES } from '../production/states';

// One schema per request shape of the production area (planning, kitting, assigning, building,
// testing, shipping); forms and the server share them.
const id = idOf('Pick one');
const isoDate = dateSchema('2026-12-07');

const orderLineIds = z.array(id).max(500, 'At most 500 order lines').default([]);
const stockBuilds = z
  .array(z.object({ optionId: id, quantity: z.coerce.number().int('Whole units only').min(1, 'At least 1').max(500, 'At most 500') }))
  .max(20)
  .default([]);
const somethingToBuild = { message: 'Pull in at least one order line or add a stock build', path: ['orderLineIds'] };

export const createBatchSchema = z.object({
  revisionId: id,
  orderLineIds,
  stockBuilds,
  notes: str().trim().max(2000).default(''),
}).refine((b) => b.orderLineIds.length + b.stockBuilds.length > 0, somethingToBuild);
export type CreateBatchInput = z.infer<typeof createBatchSchema>;

/** More order lines or stock builds for a batch still being planned. */
export const addBatchLinesSchema = z.object({ orderLineIds, stockBuilds })
  .refine((b) => b.orderLineIds.length + b.stockBuilds.length > 0, somethingToBuild);
export type AddBatchLinesInput = z.infer<typeof addBatchLinesSchema>;

export const releaseBatchSchema = z.object({
  startDate: isoDate.optional(),
  overrideReason: str().trim().max(500).optional(),
});
export type ReleaseBatchInput = z.infer<typeof releaseBatchSchema>;

export const cancelSchema = z.object({ reason: str().trim().min(3, 'Say why (at least 3 characters)').max(500) });
export type CancelInput = z.infer<typeof cancelSchema>;

export const proposePlanSchema = z.object({ startDate: isoDate.optional() });

export const applyAssignmentsSchema = z.object({
  builds: z
    .array(z.object({ unitId: id, assemblerId: id, date: isoDate }))
    .min(1, 'Assign at least one unit')
    .max(1000),
});
export type ApplyAssignmentsInput = z.infer<typeof applyAssignmentsSchema>;

export const assemblerProfileSchema = z.object({
  skills: z.array(str().trim().min(1).max(40)).max(20),
  dailyCapacityMinutes: z.coerce.number().int('Whole minutes').min(0, 'At least 0').max(1440, 'At most 1440 (a whole day)'),
});
export type AssemblerProfileInput = z.infer<typeof assemblerProfileSchema>;

/** Finishing a step; `confirmFast` says the assembler confirmed a finish far under the standard time. */
export const finishStepSchema = z.object({ confirmFast: z.boolean({ error: 'confirmFast is true or false' }).default(false) });
export type FinishStepInput = z.infer<typeof finishStepSchema>;

/** Reopening a finished step: the reason goes into the unit's history. */
export const reopenStepSchema = z.object({ reason: str().trim().min(3, 'Say why (at least 3 characters)').max(500) });
export type ReopenStepInput = z.infer<typeof reopenStepSchema>;

export const deviceReadingsSchema = z.object({
  readings: z
    .array(z.object({ optionDeviceId: id, vf: z.coerce.number({ error: 'Enter the voltage' }).positive('Enter a positive voltage').max(10, 'At most 10 V') }))
    .min(1, 'Enter at least one reading'),
  /** The assembler saw the out-of-range flag and keeps the value anyway. */
  acceptOutOfRange: z.boolean().default(false),
});
export type DeviceReadingsInput = z.infer<typeof deviceReadingsSchema>;

export const partLotsSchema = z.object({
  lots: z.array(z.object({ bomLineId: id, lot: str().trim().min(1, 'Enter the lot').max(80) })).min(1, 'Enter at least one lot'),
});
export type PartLotsInput = z.infer<typeof partLotsSchema>;

/** Multipart fields of a bench test (the WAV capture is the optional `capture` file). */
/** An empty or blank form field is no value at all (a multipart field always arrives as a string). */
const blankToUndefined = (value: unknown) => (value === null || (typeof value === 'string' && value.trim() === '') ? undefined : value);

export const benchTestSchema = z.object({
  currentDrawMa: z.coerce.number({ error: 'Enter the current draw' }).positive('Enter a positive current').max(1000, 'At most 1000 mA'),
  // Typed only when there is no capture (the service checks which): an empty box stays empty, never 0.
  measuredThdPercent: z.preprocess(blankToUndefined, z.coerce.number({ error: 'Enter the measured THD as a number' }).min(0, 'At least 0 %').max(100, 'At most 100 %').optional()),
  outcome: z.enum(['pass', 'fail'], { error: 'Choose pass or send back' }),
  reason: str().trim().max(500).default(''),
}).refine((t) => t.outcome === 'pass' || t.reason.length >= 3, { message: 'Say what needs rework (at least 3 characters)', path: ['reason'] });
export type BenchTestInput = z.infer<typeof benchTestSchema>;

/** `POST /api/captures/analyse`: the capture is the file; `unitId` (optional) adds that unit's prediction. */
export const captureAnalyseSchema = z.object({
  unitId: z.preprocess(blankToUndefined, idOf('Choose a unit').optional()),
});

/** Shipping an order: one of the carriers in the shop's settings, and its tracking number. */
export const shipOrderSchema = z.object({
  orderId: id,
  carrierId: idOf('Choose the carrier'),
  trackingNumber: str().trim().min(4, 'Enter the tracking number').max(80),
});
export type ShipOrderInput = z.infer<typeof shipOrderSchema>;

/** The address label's page: a 4 × 6 in thermal label (the default) or A6. */
export const ADDRESS_LABEL_SIZES = ['4x6', 'a6'] as const;
export const addressLabelQuerySchema = z.object({
  size: z.enum(ADDRESS_LABEL_SIZES, { message: 'Choose 4x6 or a6' }).default('4x6'),
}).strict();

export const CAPTURE_LIMITS = {
  maxBytes: 12 * 1024 * 1024,
  minSeconds: 0.2,
  maxSeconds: 10,
  sampleRates: [44100, 48000, 96000] as readonly number[],
};

// Server-paged lists of production (paging, sort and q from listQuery).
export const batchListSchema = listQuery(['number', 'state', 'createdAt', 'modelName'] as const, { sort: 'number', dir: 'desc' }, {
  state: z.enum(BATCH_STATES, { message: 'Choose a batch state from the list' }).optional(),
});
export type BatchListQuery = z.infer<typeof batchListSchema>;

/** Orders on their way to the customer: scheduled, in production or ready to ship. */
export const SHIPPING_STATES = ['scheduled', 'in_production', 'ready'] as const;
export const shippingListSchema = listQuery(['dueAt', 'number', 'state', 'customerName'] as const, { sort: 'dueAt', dir: 'asc' }, {
  state: z.enum(SHIPPING_STATES, { message: 'Choose scheduled, in production or ready' }).optional(),
});
export type ShippingListQuery = z.infer<typeof shippingListSchema>;

/** Shipments, newest first by default; `delivered=false` leaves those still on their way. */
export const shipmentListSchema = listQuery(['shippedAt', 'number', 'carrier', 'customerName'] as const, { sort: 'shippedAt', dir: 'desc' }, {
  delivered: boolParam.optional(),
});
export type ShipmentListQuery = z.infer<typeof shipmentListSchema>;

/** Units built and waiting for their bench test. */
/** The paid order lines waiting for a batch, for the plan form: a page at a time, for one model when `modelId` is given. */
export const candidateLinesSchema = listQuery(['dueAt', 'number', 'customerName'] as const, { sort: 'dueAt', dir: 'asc' }, {
  modelId: idOf('Not a valid model id').optional(),
});
export type CandidateLinesQuery = z.infer<typeof candidateLinesSchema>;

/** An assembler's own queue: `queue` is build order (rework, then on the bench, then by planned day); `q` finds a serial or pedal. */
export const buildListSchema = listQuery(['queue', 'plannedDate', 'serial', 'modelName'] as const, { sort: 'queue', dir: 'asc' });
export type BuildListQuery = z.infer<typeof buildListSchema>;

export const benchListSchema = listQuery(['serial', 'builtAt', 'modelName'] as const, { sort: 'builtAt', dir: 'asc' });
export type BenchListQuery = z.infer<typeof benchListSchema>;
