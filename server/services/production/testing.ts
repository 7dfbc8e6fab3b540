import type { Knex } from 'knex';
import { containsPattern, paged } from '../../http/paged';
import type { SessionUser } from '../../../shared/roles';
import type { BenchListQuery, BenchTestInput } from '../../../shared/schemas/production';
import { conflict, invalid } from '../../errors';
import { orderMailData } from '../mail/order-mail';
import { enqueueMail } from '../mail/outbox';
import { transitionOrder } from '../orders/transitions';
import { getSettings } from '../settings';
import { compute } from '../../compute/pool';
import { lockUnitWithBatch, transitionUnit, unitEvent } from './history';
import { toDate } from './planning';
import { predictUnit } from './unit-circuit';
import { sheetFilename, storeSheetForPassedUnit } from '../spec-sheets/sheets';

type Db = Knex | Knex.Transaction;

/** Units built and waiting for their bench test, oldest first. */
const BENCH_SORT: Record<BenchListQuery['sort'], string> = { serial: 'u.serial', builtAt: 'u.updated_at', modelName: 'm.name' };
interface BenchListRow { id: number; serial: string; planned_date: Date | null; updated_at: Date; model_name: string; option_name: string; assembler_name: string | null }

export async function benchQueue(db: Db, params: BenchListQuery) {
  const base = () => {
    const q = db('units as u').join('batches as b', 'b.id', 'u.batch_id').join('model_revisions as r', 'r.id', 'b.revision_id')
      .join('models as m', 'm.id', 'r.model_id').join('clipping_options as c', 'c.id', 'u.option_id').leftJoin('users as a', 'a.id', 'u.assembler_id')
      .where('u.state', 'built');
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('u.serial', like).orWhereILike('m.name', like)); }
    return q;
  };
  return paged(params, {
    count: base(),
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

/**
 * Records a bench test. Measured THD (and the capture's, when one is uploaded) is compared with
 * the unit's predicted THD at the reference setting; relative tolerance from settings. Pass moves
 * the unit on (and its order to ready when every unit passed); fail sends it back to its assembler.
 */
export async function recordTest(knex: Knex, user: SessionUser, unitId: number, input: BenchTestInput, capture?: { buffer: Buffer; size: number; originalname: string; mimetype: string }, publicUrl = '') {
  const analysis = capture ? await compute.wavCapture({ buffer: capture.buffer, size: capture.size, originalname: capture.originalname }) : null;
  return knex.transaction(async (trx) => {
    // Batch first: a pass may close the batch (closeBatchIfDone).
    const { unit } = await lockUnitWithBatch(trx, unitId);
    if (unit.state !== 'built') throw conflict(`Unit ${unit.serial} is not waiting for a test`);
    const settings = await getSettings(trx);
    const batch = await trx('batches').where({ id: unit.batch_id }).first();
    let predicted = unit.predicted as { thdPercent: number } | null;
    if (!predicted) predicted = await predictUnit(trx, batch.revision_id, unit.option_id, new Map(), settings.vf_test_current_ma);
    const tolerance = settings.thd_tolerance_percent;
    const within = (thd: number) => Math.abs(thd - predicted!.thdPercent) <= (tolerance / 100) * predicted!.thdPercent;
    const withinTolerance = within(input.measuredThdPercent) && (!analysis || within(analysis.thdPercent));
    if (input.outcome === 'pass' && !withinTolerance && input.reason.length < 3) {
      throw invalid('Out of tolerance: say why it passes anyway', { reason: `Measured THD is outside ±${tolerance} % of the predicted ${predicted.thdPercent.toFixed(2)} %: give a reason to pass it` });
    }
    let fileId: number | null = null;
    if (capture) {
      const [f] = await trx('files').insert({ purpose: 'wav-capture', filename: capture.originalname.slice(0, 200), content_type: 'audio/wav', size_bytes: capture.size, data: capture.buffer, uploaded_by: user.id }).returning('id');
      fileId = f.id;
    }
    const [record] = await trx('test_records').insert({
      unit_id: unitId, tester_id: user.id, current_draw_ma: input.currentDrawMa, measured_thd_percent: input.measuredThdPercent,
      predicted_thd_percent: predicted.thdPercent, tolerance_percent: tolerance, within_tolerance: withinTolerance,
      wav_file_id: fileId, wav_analysis: analysis ? JSON.stringify(analysis) : null, outcome: input.outcome, reason: input.reason,
    }).returning('id');
    const summary = `bench test: ${input.currentDrawMa.toFixed(1)} mA, THD ${input.measuredThdPercent.toFixed(2)} % (predicted ${predicted.thdPercent.toFixed(2)} %)${analysis ? `, capture THD ${analysis.thdPercent.toFixed(2)} %` : ''}${withinTolerance ? '' : ', out of tolerance'}`;
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
          data: { ...base.data, serial: unit.serial, description: line?.description ?? 'pedal', testedAt: new Date().toISOString(), hasSpecSheet: true, measuredThdPercent: input.measuredThdPercent, predictedThdPercent: predicted.thdPercent },
          attachments: [{ filename: sheetFilename(unit.serial), fileId: sheetFileId }],
        });
        if (order.state === 'in_production' && (await orderFullyPassed(trx, unit.order_id))) {
          await transitionOrder(trx, unit.order_id, 'ready', { userId: user.id, message: 'every unit passed its bench test' });
        }
      }
      await closeBatchIfDone(trx, unit.batch_id);
    }
    return { id: record.id as number, unitState: unit.state, withinTolerance, predictedThdPercent: predicted.thdPercent, capture: analysis };
  });
}

/** A batch closes when none of its units is still open. */
export async function closeBatchIfDone(trx: Knex.Transaction, batchId: number) {
  const open = await trx('units').where({ batch_id: batchId }).whereIn('state', ['waiting', 'building', 'built', 'rework']).first();
  if (!open) await trx('batches').where({ id: batchId }).where({ state: 'on_bench' }).update({ state: 'closed', closed_at: trx.fn.now(), updated_at: trx.fn.now() });
}
