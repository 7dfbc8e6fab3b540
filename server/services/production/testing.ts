import type { Knex } from 'knex';
import { containsPattern, paged } from '../../http/paged';
import type { SessionUser } from '../../../shared/roles';
import type { BenchListQuery, BenchTestInput } from '../../../shared/schemas/production';
import { conflict, invalid, notFound } from '../../errors';
import { compareWithPrediction, predictionAtReference, type StoredPrediction, type Tolerances } from '../../../shared/production/capture-check';
import { assertMayView } from './building';
import { orderMailData } from '../mail/order-mail';
import { enqueueMail } from '../mail/outbox';
import { transitionOrder } from '../orders/transitions';
import { getSettings } from '../settings';
import { compute } from '../../compute/pool';
import { lockUnitWithBatch, transitionUnit, unitEvent } from './history';
import { toDate } from './planning';
import { predictUnit } from './unit-circuit';
import { sheetFilename, storeSheetForPassedUnit } from '../spec-sheets/sheets';
import { inConstants } from '../../db/prepared';

type Db = Knex | Knex.Transaction;

/** Units built and waiting for their bench test, oldest first. */
const BENCH_SORT: Record<BenchListQuery['sort'], string> = { serial: 'u.serial', builtAt: 'u.updated_at', modelName: 'm.name' };
interface BenchListRow { id: number; serial: string; planned_date: Date | null; updated_at: Date; model_name: string; option_name: string; assembler_name: string | null }

export async function benchQueue(db: Db, params: BenchListQuery) {
  // Every unit has its batch, revision, model and option (foreign keys, not null): the count joins
  // them only to search.
  const base = (joined = true) => {
    const q = db('units as u').where(inConstants(db, 'u.state', ['built']));
    if (!joined) return q;
    q.join('batches as b', 'b.id', 'u.batch_id').join('model_revisions as r', 'r.id', 'b.revision_id')
      .join('models as m', 'm.id', 'r.model_id').join('clipping_options as c', 'c.id', 'u.option_id').leftJoin('users as a', 'a.id', 'u.assembler_id');
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('u.serial', like).orWhereILike('m.name', like)); }
    return q;
  };
  return paged(params, {
    count: base(Boolean(params.q)),
    rows: base().select('u.id', 'u.serial', 'u.planned_date', 'u.updated_at', 'm.name as model_name', 'c.name as option_name', 'a.name as assembler_name'),
    sortColumns: BENCH_SORT, tieBreak: 'u.id',
    map: (r: BenchListRow) => ({ id: r.id, serial: r.serial, modelName: r.model_name, optionName: r.option_name, assemblerName: r.assembler_name, builtAt: r.updated_at, plannedDate: r.planned_date ? toDate(r.planned_date) : null }),
  });
}

/** All of an order's units exist and have passed (cancelled ones do not count). */
export async function orderFullyPassed(trx: Db, orderId: number) {
  const wanted = await trx('order_lines').where({ order_id: orderId }).sum({ n: 'quantity' }).first();
  const units = await trx('units').where({ order_id: orderId }).whereNot('state', 'cancelled').select('state');
  return units.length >= Number(wanted?.n ?? 0) && units.every((u: { state: string }) => u.state === 'passed');
}

type UploadedCapture = { buffer: Buffer; size: number; originalname: string; mimetype: string };

/** The capture upload must be a WAV by name or type (its bytes are checked by the analysis). */
export function assertWavUpload(file: UploadedCapture) {
  if (!/\.wav$/i.test(file.originalname) && !/wav/i.test(file.mimetype)) throw invalid('The capture must be a WAV file', { capture: 'Only .wav files' });
}

/** Analyses a capture in the compute pool; never called for anything but a checked upload. */
const analyse = (file: UploadedCapture) => compute.wavCapture({ buffer: file.buffer, size: file.size, originalname: file.originalname });

/** The unit's prediction at the bench's reference setting (computed now, not stored, when it has none yet) and the shop's tolerances. */
async function unitPredictionForBench(db: Db, storedPrediction: StoredPrediction | null, revisionId: number, optionId: number) {
  const settings = await getSettings(db);
  const stored = storedPrediction ?? await predictUnit(db, revisionId, optionId, new Map(), settings.vf_test_current_ma);
  const tolerances: Tolerances = { thdPercent: settings.thd_tolerance_percent, harmonicDb: settings.harmonic_tolerance_db };
  return { prediction: predictionAtReference(stored), tolerances };
}

/**
 * `POST /api/captures/analyse`: reads a capture and records nothing. With `unitId`, the unit's
 * prediction at the reference setting and the comparison come beside the reading.
 */
export async function analyseCaptureUpload(db: Db, user: SessionUser, file: UploadedCapture | undefined, unitId?: number) {
  if (!file) throw invalid('Choose a WAV capture to analyse', { capture: 'Choose a WAV file of the 1 kHz test tone' });
  assertWavUpload(file);
  let unit: { id: number; serial: string; assembler_id: number | null; predicted: StoredPrediction | null; option_id: number; revision_id: number } | undefined;
  if (unitId !== undefined) {
    unit = await db('units as u').join('batches as b', 'b.id', 'u.batch_id').where('u.id', unitId).first('u.id', 'u.serial', 'u.assembler_id', 'u.predicted', 'u.option_id', 'b.revision_id');
    if (!unit) throw notFound('No such unit');
    assertMayView(user, unit);
  }
  const reading = await analyse(file);
  if (!unit) return reading;
  const { prediction, tolerances } = await unitPredictionForBench(db, unit.predicted, unit.revision_id, unit.option_id);
  return { ...reading, unit: { id: unit.id, serial: unit.serial }, prediction, comparison: compareWithPrediction(prediction, reading, tolerances) };
}

/**
 * Records a bench test. The measured THD is the capture's when one is uploaded, else the typed one
 * (one of the two is required; an empty box is never 0). The measurement is compared with the
 * unit's prediction at the reference setting: THD within ±% of it and, with a capture, each of
 * H2…H8 within ±dB (shop settings). Pass moves the unit on (and its order to ready when every unit
 * passed); fail sends it back to its assembler.
 */
export async function recordTest(knex: Knex, user: SessionUser, unitId: number, input: BenchTestInput, capture?: UploadedCapture, publicUrl = '') {
  if (capture) assertWavUpload(capture);
  if (capture && input.measuredThdPercent !== undefined) {
    throw invalid('The THD comes from the capture', { measuredThdPercent: 'Leave this empty: the measured THD is read from the capture' });
  }
  if (!capture && input.measuredThdPercent === undefined) {
    throw invalid('Enter the measured THD or add a capture', { measuredThdPercent: 'Enter the measured THD (%), or choose a WAV capture to read it from' });
  }
  const analysis = capture ? await analyse(capture) : null;
  const measuredThd = analysis ? analysis.thdFPercent : input.measuredThdPercent!;
  return knex.transaction(async (trx) => {
    // Batch first: a pass may close the batch (closeBatchIfDone).
    const { unit } = await lockUnitWithBatch(trx, unitId);
    if (unit.state !== 'built') throw conflict(`Unit ${unit.serial} is not waiting for a test`);
    const batch = await trx('batches').where({ id: unit.batch_id }).first();
    const { prediction, tolerances } = await unitPredictionForBench(trx, unit.predicted, batch.revision_id, unit.option_id);
    const comparison = compareWithPrediction(prediction, { thdFPercent: measuredThd, harmonics: analysis?.harmonics }, tolerances);
    const withinTolerance = comparison.within;
    if (input.outcome === 'pass' && !withinTolerance && input.reason.length < 3) {
      throw invalid(`Out of tolerance: ${comparison.problems.join('; ')}`, { reason: `${comparison.problems.join('; ')}: give a reason to pass it` });
    }
    // The shop's highest current draw (settings): a unit drawing more passes only with a reason.
    const maxDrawMa = (await getSettings(trx)).max_current_draw_ma;
    const overDraw = input.currentDrawMa > maxDrawMa ? `draws ${input.currentDrawMa} mA, above the shop's highest ${maxDrawMa} mA` : null;
    if (input.outcome === 'pass' && overDraw && input.reason.length < 3) {
      throw invalid(`The unit ${overDraw}`, { currentDrawMa: `Above the highest draw of ${maxDrawMa} mA`, reason: `It ${overDraw}: give a reason to pass it` });
    }
    let fileId: number | null = null;
    if (capture) {
      const [f] = await trx('files').insert({ purpose: 'wav-capture', filename: capture.originalname.slice(0, 200), content_type: 'audio/wav', size_bytes: capture.size, data: capture.buffer, uploaded_by: user.id }).returning('id');
      fileId = f.id;
    }
    const [record] = await trx('test_records').insert({
      unit_id: unitId, tester_id: user.id, current_draw_ma: input.currentDrawMa, measured_thd_percent: measuredThd,
      predicted_thd_percent: prediction.thdFPercent, tolerance_percent: tolerances.thdPercent, harmonic_tolerance_db: tolerances.harmonicDb, within_tolerance: withinTolerance,
      wav_file_id: fileId, wav_analysis: analysis ? JSON.stringify(analysis) : null,
      measured_harmonics: analysis ? JSON.stringify(analysis.harmonics) : null, measured_thd_r_percent: analysis ? analysis.thdRPercent : null,
      outcome: input.outcome, reason: input.reason,
    }).returning('id');
    const summary = `bench test: ${input.currentDrawMa.toFixed(1)} mA, THD ${measuredThd.toFixed(2)} % ${analysis ? 'from the capture' : 'typed'} (predicted ${prediction.thdFPercent.toFixed(2)} %)${withinTolerance ? '' : `, out of tolerance: ${comparison.problems.join('; ')}`}${overDraw ? `, ${overDraw}` : ''}`;
    await unitEvent(trx, unitId, 'test', summary, user.id);
    if (input.outcome === 'fail') {
      await transitionUnit(trx, unit, 'rework', user.id, `sent back for rework: ${input.reason}`);
    } else {
      await transitionUnit(trx, unit, 'passed', user.id, input.reason ? `passed: ${input.reason}` : 'passed');
      // The sheet is stored as the unit passes, so later catalog edits cannot change what shipped with it.
      const sheetFileId = await storeSheetForPassedUnit(trx, unit.id, user.id);
      if (unit.order_id) {
        const order = await trx('orders').where({ id: unit.order_id }).first();
        const base = await orderMailData(trx, unit.order_id, publicUrl);
        const batchLine = await trx('batch_lines').where({ id: unit.batch_line_id }).first();
        const line = batchLine?.order_line_id ? await trx('order_lines').where({ id: batchLine.order_line_id }).first() : null;
        await enqueueMail(trx, {
          dedupeKey: `unit-passed:${unit.id}`, template: 'unit-passed', to: base.to,
          data: { ...base.data, serial: unit.serial, description: line?.description ?? 'pedal', testedAt: new Date().toISOString(), hasSpecSheet: true, measuredThdPercent: measuredThd, predictedThdPercent: prediction.thdFPercent },
          attachments: [{ filename: sheetFilename(unit.serial), fileId: sheetFileId }],
        });
        if (order.state === 'in_production' && (await orderFullyPassed(trx, unit.order_id))) {
          await transitionOrder(trx, unit.order_id, 'ready', { userId: user.id, message: 'every unit passed its bench test' });
        }
      }
      await closeBatchIfDone(trx, unit.batch_id);
    }
    return { id: record.id as number, unitState: unit.state, withinTolerance, measuredThdPercent: measuredThd, predictedThdPercent: prediction.thdFPercent, capture: analysis, comparison };
  });
}

/** A batch closes when none of its units is still open. */
export async function closeBatchIfDone(trx: Knex.Transaction, batchId: number) {
  const open = await trx('units').where({ batch_id: batchId }).whereIn('state', ['waiting', 'building', 'built', 'rework']).first();
  if (!open) await trx('batches').where({ id: batchId }).where({ state: 'on_bench' }).update({ state: 'closed', closed_at: trx.fn.now(), updated_at: trx.fn.now() });
}
