// The CPU-heavy work a request or a job waits for, as plain functions of cloneable data. They run
// in the compute pool's worker threads (server/compute/pool.ts), so the web process's event loop
// stays free; never call them directly from a route or service, call the pool's functions instead.
import { computeProfile, forwardVoltage, perUnitCircuit, type CircuitSpec, type DeviceModel, type MeasuredForwardVoltages } from '../../shared/engine';
import { EngineInputError } from '../../shared/engine/errors';
import { planBatchMatching, type PlanInput } from '../../shared/matching/batch';
import { DomainError, invalid } from '../errors';
import { renderInvoice, type InvoiceDocument } from '../pdf/invoice';
import { renderAddressLabel, renderSerialLabels, type AddressLabelInput, type SerialLabelInput } from '../pdf/labels';
import { renderPackingSlip, type SlipInput } from '../pdf/packing-slip';
import { renderSpecSheet } from '../pdf/spec-sheet';
import type { SpecSheetData } from '../pdf/spec-sheet-data';
import { computeDesign } from '../services/engine/designs';
import { computeContractProfile } from '../services/engine/profiles';
import { analyseWav } from '../services/production/capture';
import { zipArchive } from '../services/spec-sheets/zip';
import { nominalBand, sheetProfile, type NominalBand } from '../services/spec-sheets/sheet-profile';

/** A task's answer: its value, or a DomainError as data (a class does not survive the thread boundary). */
export type Outcome<T> = { ok: true; value: T } | { ok: false; error: { status: number; code: string; message: string; fields?: Record<string, string> } };

async function outcome<T>(work: () => T | Promise<T>): Promise<Outcome<T>> {
  try {
    return { ok: true, value: await work() };
  } catch (error) {
    if (error instanceof DomainError) return { ok: false, error: { status: error.status, code: error.code, message: error.message, fields: error.fields } };
    throw error;
  }
}

/** POST /api/profiles: one operating point per the engine's contract (400/422 as DomainErrors). */
export const contractProfile = (body: unknown) => outcome(() => computeContractProfile(body));

/** The option's nominal P5–P95 band (Monte Carlo): the slowest part of a spec sheet. */
export const sheetBand = (a: { spec: CircuitSpec; points: number; draws: number }) => outcome(() => nominalBand(a.spec, a.points, a.draws));

/** The unit's own profile for its spec sheet. */
export const specSheetProfile = (a: { spec: CircuitSpec; measured: MeasuredForwardVoltages | null; band: NominalBand | null }) =>
  outcome(() => sheetProfile(a.spec, a.measured, a.band));

/** The spec sheet's PDF bytes. */
export const specSheetPdf = (data: SpecSheetData) => outcome(async () => new Uint8Array(await renderSpecSheet(data)));

/** A batch archive's zip bytes (entries' bytes arrive as plain Uint8Arrays). */
export const zipEntries = (entries: { name: string; data: Uint8Array; date: Date }[]) =>
  outcome(async () => new Uint8Array(await zipArchive(entries.map((e) => ({ ...e, data: Buffer.from(e.data.buffer, e.data.byteOffset, e.data.byteLength) })))));

/** An invoice's or credit note's PDF bytes. */
export const invoicePdf = (input: InvoiceDocument) => outcome(async () => new Uint8Array(await renderInvoice(input)));

/** The packing slip's PDF bytes. */
export const packingSlipPdf = (input: SlipInput) => outcome(async () => new Uint8Array(await renderPackingSlip(input)));

/** The parcel's address label PDF (4 × 6 in or A6) with the order number's barcode. */
export const addressLabelPdf = (input: AddressLabelInput) => outcome(async () => new Uint8Array(await renderAddressLabel(input)));

/** A sheet of serial labels with each unit's /verify QR code. */
export const serialLabelsPdf = (input: SerialLabelInput) => outcome(async () => new Uint8Array(await renderSerialLabels(input)));

/** A bench capture: the WAV decoded and its test tone's harmonics read (both heavy for a long capture). */
export const wavCapture = (file: { buffer: Uint8Array; size: number; originalname: string }) =>
  // The bytes arrive as a plain Uint8Array (a Buffer's class does not cross threads).
  outcome(() => analyseWav({ ...file, buffer: Buffer.from(file.buffer.buffer, file.buffer.byteOffset, file.buffer.byteLength) }));

export interface UnitPredictionInput {
  spec: CircuitSpec;
  /** Each string's devices in order, with the measured Vf where one was taken (else null: nominal). */
  devices: { side: 'positive' | 'negative'; model: DeviceModel; measuredVf: number | null }[];
  testCurrentA: number;
}

/** A unit's predicted profile: IS refitted from its measured Vf (N kept), then the full profile. */
export const unitPrediction = ({ spec, devices, testCurrentA }: UnitPredictionInput) => outcome(() => {
  const vf = (side: 'positive' | 'negative') => devices.filter((d) => d.side === side).map((d) => d.measuredVf ?? forwardVoltage(d.model, testCurrentA));
  try {
    const circuit = perUnitCircuit(spec, { positive: vf('positive'), negative: vf('negative'), testCurrentA });
    const profile = computeProfile(circuit, { sweepPoints: 13, transferPoints: 2 });
    const s = profile.reference.spectrum;
    return {
      thdPercent: s.thdF * 100,
      thdRPercent: s.thdR * 100,
      referenceDrive: profile.reference.drive,
      harmonics: s.harmonics.map((h) => ({ order: h.order, dbc: h.dbc })),
      sweep: profile.sweep.map((p) => ({ drive: p.drive, thdPercent: p.thdF * 100 })),
    };
  } catch (error) {
    if (error instanceof EngineInputError) throw invalid(`The profile cannot be computed: ${error.message}`, { readings: error.message });
    throw error;
  }
});

/** A batch's device matching from its trays (shared/matching/batch.ts): engine solves for every cross pair and baseline. */
export const batchMatching = (input: PlanInput) => outcome(() => planBatchMatching(input));

/**
 * The option designer's search (POST /api/designs/search). `stop` is a flag shared with the caller (an
 * Int32Array over a SharedArrayBuffer): set to 1, the search ends at the next candidate with `cancelled`.
 */
export const designSearch = (a: { body: unknown; stop: Int32Array }) => outcome(() => computeDesign(a.body, () => Atomics.load(a.stop, 0) !== 0));
