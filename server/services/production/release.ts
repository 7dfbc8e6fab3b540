import type { Knex } from 'knex';
import type { ReleaseBatchInput } from '../../../shared/schemas/production';
import { addWorkingDays, proposePlan, workingDayOnOrAfter } from '../../../shared/production/schedule';
import { batchLabel, unitSerial } from '../../../shared/production/serials';
import { conflict } from '../../errors';
import { orderMailData } from '../mail/order-mail';
import { enqueueMail } from '../mail/outbox';
import { transitionOrder } from '../orders/transitions';
import { getSettings } from '../settings';
import { listAssemblers } from './assignment';
import { assertBatchTransition, lockBatch } from './planning';
import { explodeBom } from './requirements';
import { appendMovements, batchHoldings, lockUnitRows } from '../stock/ledger';

/**
 * Releases a batch: freezes its revision, creates its serial-numbered units (1..N, no gaps),
 * schedules the pulled orders and queues each customer's "scheduled" mail with the ship date
 * the proposed plan gives. Refused (409) with shortages unless the planner gives a reason.
 */
export async function releaseBatch(knex: Knex, userId: number, batchId: number, input: ReleaseBatchInput, publicUrl = '') {
  return knex.transaction(async (trx) => {
    const batch = await lockBatch(trx, batchId);
    assertBatchTransition(batch, 'released');
    const lines = await trx('batch_lines as bl').leftJoin('order_lines as ol', 'ol.id', 'bl.order_line_id')
      .where('bl.batch_id', batchId).select('bl.id', 'bl.option_id', 'bl.quantity', 'bl.order_line_id', 'ol.order_id', 'ol.description').orderBy('bl.id');
    const perOption = new Map<number, number>();
    for (const l of lines) perOption.set(l.option_id, (perOption.get(l.option_id) ?? 0) + l.quantity);
    const requirements = await explodeBom(trx, batch.revision_id, perOption, null);
    const short = requirements.filter((r) => r.shortage > 0);
    if (short.length && !input.overrideReason) {
      throw conflict(`${short.length} part${short.length === 1 ? ' is' : 's are'} short (${short.slice(0, 5).map((s) => `${s.partNumber} ×${s.shortage}`).join(', ')}): order them, or release anyway with a reason`);
    }
    if (short.length && (input.overrideReason ?? '').length < 3) throw conflict('Give a reason of at least 3 characters to release with shortages');

    // Orders must still be paid and waiting: a refund since planning would make this wrong.
    const orderIds = [...new Set(lines.map((l) => l.order_id).filter(Boolean))] as number[];
    const orders = orderIds.length ? await trx('orders as o').join('users as u', 'u.id', 'o.customer_id').whereIn('o.id', orderIds).forUpdate('o').select('o.*', 'u.email', 'u.name as customer_name') : [];
    for (const o of orders) if (!['paid', 'scheduled'].includes(o.state)) throw conflict(`Order ${o.number} is no longer paid and waiting: take it out of the batch`);

    const settings = await getSettings(trx);
    await trx('model_revisions').where({ id: batch.revision_id }).whereNull('frozen_at').update({ frozen_at: trx.fn.now() });
    const start = workingDayOnOrAfter(input.startDate ?? new Date().toISOString().slice(0, 10));
    await trx('batches').where({ id: batchId }).update({
      state: 'released', released_by: userId, released_at: trx.fn.now(), planned_start: start, updated_at: trx.fn.now(),
      shortage_override_reason: short.length ? input.overrideReason : null,
      shortages_at_release: short.length ? JSON.stringify(short.map((s) => ({ partNumber: s.partNumber, shortage: s.shortage }))) : null,
    });

    const unitRows: Record<string, unknown>[] = [];
    let sequence = 0;
    for (const l of lines) {
      for (let i = 0; i < l.quantity; i++) {
        sequence += 1;
        unitRows.push({ serial: unitSerial(settings.serial_prefix, batch.number, sequence), batch_id: batchId, sequence, batch_line_id: l.id, option_id: l.option_id, order_id: l.order_id ?? null });
      }
    }
    const units: { id: number; order_id: number | null; serial: string }[] = [];
    for (let i = 0; i < unitRows.length; i += 500) units.push(...(await trx('units').insert(unitRows.slice(i, i + 500)).returning(['id', 'order_id', 'serial'])));
    const events = units.map((u) => ({ unit_id: u.id, kind: 'state-change', to_state: 'waiting', message: `created in batch ${batchLabel(batch.number)}`, user_id: userId }));
    for (let i = 0; i < events.length; i += 500) await trx('unit_events').insert(events.slice(i, i + 500));
    const lineIds = lines.map((l) => l.order_line_id).filter(Boolean);
    if (lineIds.length) await trx('order_lines').whereIn('id', lineIds).update({ batch_id: batchId });

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
    for (const o of orders) {
      // Nobody qualified yet: fall back to two working weeks after the start.
      const shipDate = addWorkingDays(lastBuild.get(o.id) ?? addWorkingDays(start, 9), 1);
      if (o.state === 'paid') {
        await transitionOrder(trx, o.id, 'scheduled', { userId, message: `scheduled into batch ${batchLabel(batch.number)}, estimated to ship ${shipDate}` });
      }
      const base = await orderMailData(trx, o.id, publicUrl);
      await enqueueMail(trx, {
        dedupeKey: `order-scheduled:${o.id}:${batchId}`,
        template: 'order-scheduled',
        to: base.to,
        data: { ...base.data, batchCode: batchLabel(batch.number), estimatedShipDate: shipDate, serials: units.filter((u) => u.order_id === o.id).map((u) => u.serial) },
      });
    }
    return { id: batchId, state: 'released' as const, units: units.length, orders: orders.length, shortagesOverridden: short.length };
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
