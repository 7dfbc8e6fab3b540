import type { Knex } from 'knex';
import type { ReleaseBatchInput } from '../../../shared/schemas/production';
import type { BatchState } from '../../../shared/production/states';
import { addWorkingDays, proposePlan, workingDayOnOrAfter } from '../../../shared/production/schedule';
import { batchLabel, unitSerial } from '../../../shared/production/serials';
import { conflict } from '../../errors';
import { wakeJob } from '../../jobs/wake';
import { orderMailData } from '../mail/order-mail';
import { enqueueMail } from '../mail/outbox';
import { transitionOrder } from '../orders/transitions';
import { shopFormatter } from '../format';
import { getSettings } from '../settings';
import { listAssemblers } from './assignment';
import { assertBatchTransition, lockBatch } from './planning';
import { explodeBom } from './requirements';
import { returnMatchedSlots } from './trays';
import { appendMovements, batchHoldings, lockUnitRows } from '../stock/ledger';

type Line = { id: number; option_id: number; quantity: number; order_line_id: number | null; order_id: number | null };
type Batch = { id: number; number: number; state: BatchState; revision_id: number; planned_start: string | Date | null };
/** What the job needs to finish a release it did not start. */
export interface ReleaseInput { userId: number; startDate: string; publicUrl: string }

/**
 * Releases a batch: freezes its revision, creates its serial-numbered units (1..N, no gaps),
 * schedules the pulled orders and queues each customer's "scheduled" mail with the ship date
 * the proposed plan gives. Refused (409) with shortages unless the planner gives a reason.
 * A batch of at most `chunkUnits` units is released in this one transaction; a bigger one is
 * checked and marked 'releasing' here, and the release job (release-job.ts) creates its units
 * chunk by chunk and finishes it, so no request or event loop waits for thousands of rows.
 */
/** The job loop that creates a big release's units (server/jobs/releases.ts), woken on commit. */
export const RELEASE_LOOP = 'batch-releases';

export async function releaseBatch(knex: Knex, userId: number, batchId: number, input: ReleaseBatchInput, publicUrl = '', chunkUnits = 200) {
  return knex.transaction(async (trx) => {
    const batch = await lockBatch(trx, batchId);
    const lines = await batchLinesOf(trx, batchId);
    const total = lines.reduce((n, l) => n + l.quantity, 0);
    const big = total > chunkUnits;
    assertBatchTransition(batch, big ? 'releasing' : 'released');
    const perOption = new Map<number, number>();
    for (const l of lines) perOption.set(l.option_id, (perOption.get(l.option_id) ?? 0) + l.quantity);
    const requirements = await explodeBom(trx, batch.revision_id, perOption, null);
    const short = requirements.filter((r) => r.shortage > 0);
    if (short.length && !input.overrideReason) {
      throw conflict(`${short.length} part${short.length === 1 ? ' is' : 's are'} short (${short.slice(0, 5).map((s) => `${s.partNumber} ×${s.shortage}`).join(', ')}): order them, or release anyway with a reason`);
    }
    if (short.length && (input.overrideReason ?? '').length < 3) throw conflict('Give a reason of at least 3 characters to release with shortages');

    // Orders must still be paid and waiting: a refund since planning would make this wrong.
    const orders = await lockOrders(trx, lines);
    for (const o of orders) if (!['paid', 'scheduled'].includes(o.state)) throw conflict(`Order ${o.number} is no longer paid and waiting: take it out of the batch`);

    await trx('model_revisions').where({ id: batch.revision_id }).whereNull('frozen_at').update({ frozen_at: trx.fn.now() });
    const start = workingDayOnOrAfter(input.startDate ?? new Date().toISOString().slice(0, 10));
    const release: ReleaseInput = { userId, startDate: start, publicUrl };
    await trx('batches').where({ id: batchId }).update({
      state: big ? 'releasing' : 'released', released_by: userId, released_at: trx.fn.now(), planned_start: start, updated_at: trx.fn.now(),
      shortage_override_reason: short.length ? input.overrideReason : null,
      shortages_at_release: short.length ? JSON.stringify(short.map((s) => ({ partNumber: s.partNumber, shortage: s.shortage }))) : null,
      release_total: total, release_done: 0, release_input: JSON.stringify(release), release_error: null,
    });
    const counts = { id: batchId, units: total, orders: orders.length, shortagesOverridden: short.length };
    if (big) {
      await wakeJob(trx, RELEASE_LOOP);
      return { ...counts, state: 'releasing' as const, done: 0 };
    }
    await createUnitChunk(trx, batch, lines, 0, total, userId);
    await finishRelease(trx, batch, lines, release);
    return { ...counts, state: 'released' as const, done: total };
  });
}

async function batchLinesOf(trx: Knex.Transaction, batchId: number): Promise<Line[]> {
  return trx('batch_lines as bl').leftJoin('order_lines as ol', 'ol.id', 'bl.order_line_id')
    .where('bl.batch_id', batchId).select('bl.id', 'bl.option_id', 'bl.quantity', 'bl.order_line_id', 'ol.order_id').orderBy('bl.id');
}

async function lockOrders(trx: Knex.Transaction, lines: Line[]) {
  const orderIds = [...new Set(lines.map((l) => l.order_id).filter(Boolean))] as number[];
  return orderIds.length ? trx('orders').whereIn('id', orderIds).orderBy('id').forUpdate().select('*') : [];
}

/** Creates units `from`+1 … `from`+`count` of the batch (sequence = serial number, lines in id order). */
async function createUnitChunk(trx: Knex.Transaction, batch: Batch, lines: Line[], from: number, count: number, userId: number) {
  const settings = await getSettings(trx);
  const unitRows: Record<string, unknown>[] = [];
  let sequence = 0;
  for (const l of lines) {
    for (let i = 0; i < l.quantity && unitRows.length < count; i++) {
      sequence += 1;
      if (sequence <= from) continue;
      unitRows.push({ serial: unitSerial(settings.serial_prefix, batch.number, sequence), batch_id: batch.id, sequence, batch_line_id: l.id, option_id: l.option_id, order_id: l.order_id ?? null });
    }
  }
  const units: { id: number }[] = [];
  for (let i = 0; i < unitRows.length; i += 500) units.push(...(await trx('units').insert(unitRows.slice(i, i + 500)).returning(['id'])));
  const events = units.map((u) => ({ unit_id: u.id, kind: 'state-change', to_state: 'waiting', message: `created in batch ${batchLabel(batch.number)}`, user_id: userId }));
  for (let i = 0; i < events.length; i += 500) await trx('unit_events').insert(events.slice(i, i + 500));
  await trx('batches').where({ id: batch.id }).update({ release_done: from + units.length, updated_at: trx.fn.now() });
  return units.length;
}

/** Once every unit exists: the order lines join the batch, orders are scheduled and each customer is mailed a ship date. */
async function finishRelease(trx: Knex.Transaction, batch: Batch, lines: Line[], release: ReleaseInput) {
  const { userId, startDate: start, publicUrl } = release;
  const batchId = batch.id;
  const lineIds = lines.map((l) => l.order_line_id).filter(Boolean) as number[];
  if (lineIds.length) await trx('order_lines').whereIn('id', lineIds).update({ batch_id: batchId });
  const units: { id: number; order_id: number | null; serial: string }[] = await trx('units').where({ batch_id: batchId }).orderBy('sequence').select('id', 'order_id', 'serial');
  // A big release finishes in a later transaction: an order refunded meanwhile is left out, not failed on.
  const orders = (await lockOrders(trx, lines)).filter((o) => ['paid', 'scheduled'].includes(o.state));

  // Estimated ship date from the proposed plan: the working day after the order's last build.
  const steps = await trx('build_steps').where({ revision_id: batch.revision_id }).select('standard_minutes', 'skill');
  const minutes = steps.reduce((s: number, x: { standard_minutes: number }) => s + x.standard_minutes, 0);
  const skills = [...new Set(steps.map((s: { skill: string }) => s.skill))] as string[];
  const due = new Map(orders.map((o) => [o.id, o.due_at ? new Date(o.due_at).toISOString().slice(0, 10) : null]));
  const plan = proposePlan(units.map((u) => ({ unitId: u.id, minutes, skills, dueDate: u.order_id ? due.get(u.order_id) ?? null : null })), await listAssemblers(trx), start);
  const lastBuild = new Map<number, string>();
  const orderOf = new Map(units.map((u) => [u.id, u.order_id]));
  for (const b of plan.builds) {
    const orderId = orderOf.get(b.unitId);
    if (orderId && (!lastBuild.has(orderId) || b.date > lastBuild.get(orderId)!)) lastBuild.set(orderId, b.date);
  }
  const serialsOf = new Map<number, string[]>();
  for (const u of units) if (u.order_id) serialsOf.set(u.order_id, [...(serialsOf.get(u.order_id) ?? []), u.serial]);
  const format = shopFormatter(await getSettings(trx));
  for (const o of orders) {
    // Nobody qualified yet: fall back to two working weeks after the start.
    const shipDate = addWorkingDays(lastBuild.get(o.id) ?? addWorkingDays(start, 9), 1);
    if (o.state === 'paid') {
      await transitionOrder(trx, o.id, 'scheduled', { userId, message: `Scheduled into batch ${batchLabel(batch.number)}, estimated to ship ${format.date(shipDate)}` });
    }
    const base = await orderMailData(trx, o.id, publicUrl);
    await enqueueMail(trx, {
      dedupeKey: `order-scheduled:${o.id}:${batchId}`,
      template: 'order-scheduled',
      to: base.to,
      data: { ...base.data, batchCode: batchLabel(batch.number), estimatedShipDate: shipDate, serials: serialsOf.get(o.id) ?? [] },
    });
  }
  await trx('batches').where({ id: batchId }).update({ state: 'released', release_done: units.length, release_error: null, updated_at: trx.fn.now() });
}

/**
 * One step of a 'releasing' batch, in its own transaction under the batch's row lock: the next chunk
 * of units, or, once all exist, the finish. Progress is counted from the units themselves, so two
 * workers never make a unit twice and a worker that died mid-chunk left nothing half-made.
 * Returns false when the batch has nothing left to do.
 */
export async function releaseStep(knex: Knex, batchId: number, chunkUnits: number) {
  return knex.transaction(async (trx) => {
    const batch = await lockBatch(trx, batchId);
    if (batch.state !== 'releasing') return false;
    const lines = await batchLinesOf(trx, batchId);
    const release = batch.release_input as ReleaseInput;
    const made = Number((await trx('units').where({ batch_id: batchId }).count({ n: '*' }).first())?.n ?? 0);
    if (made < batch.release_total) {
      await createUnitChunk(trx, batch, lines, made, Math.min(chunkUnits, batch.release_total - made), release.userId);
      return true;
    }
    await finishRelease(trx, batch, lines, release);
    return false;
  });
}

/** Cancels a batch before building starts: its units are cancelled, its reservation released and its orders go back to waiting. */
export async function cancelBatch(knex: Knex, userId: number, batchId: number, reason: string) {
  return knex.transaction(async (trx) => {
    const batch = await lockBatch(trx, batchId);
    assertBatchTransition(batch, 'cancelled');
    // The ledger's lock order: the batch (above), its units, then the parts it holds.
    const units = await lockUnitRows(trx, await trx('units').where({ batch_id: batchId }).pluck('id'));
    if (units.some((u) => !['waiting', 'cancelled'].includes(u.state) || u.kitted_at)) throw conflict('Units of this batch are kitted or being built: cancel those units one by one instead');
    const held = [...(await batchHoldings(trx, batchId))].filter(([, h]) => h.reserved > 0);
    await appendMovements(trx, held.map(([partId, h]) => ({ partId, kind: 'release' as const, quantity: h.reserved, userId, batchId, reason: `batch cancelled: ${reason}` })));
    const waiting = units.filter((u) => u.state === 'waiting');
    await trx('units').whereIn('id', waiting.map((u) => u.id)).update({ state: 'cancelled', updated_at: trx.fn.now() });
    await returnMatchedSlots(trx, waiting.map((u) => u.id));
    if (waiting.length) await trx('unit_events').insert(waiting.map((u: { id: number }) => ({ unit_id: u.id, kind: 'state-change', from_state: 'waiting', to_state: 'cancelled', message: reason, user_id: userId })));
    const orderIds: number[] = await trx('order_lines').where({ batch_id: batchId }).distinct().pluck('order_id');
    await trx('order_lines').where({ batch_id: batchId }).update({ batch_id: null });
    for (const orderId of orderIds) {
      const o = await trx('orders').where({ id: orderId }).first();
      if (o.state === 'scheduled') await transitionOrder(trx, orderId, 'paid', { userId, message: `batch ${batchLabel(batch.number)} cancelled` });
    }
    await trx('batches').where({ id: batchId }).update({ state: 'cancelled', notes: trx.raw("notes || ?", [`\nCancelled: ${reason}`]), updated_at: trx.fn.now() });
    return { id: batchId, state: 'cancelled' as const };
  });
}
