import type { Knex } from 'knex';
import type { ApplyAssignmentsInput, AssemblerProfileInput } from '../../../shared/schemas/production';
import { assessPlan, proposePlan, workingDayOnOrAfter, type PlanAssembler, type PlanJob } from '../../../shared/production/schedule';
import { conflict, invalid, notFound } from '../../errors';
import { shopFormatter } from '../format';
import { getSettings } from '../settings';
import { lockBatchRow, lockUnitRows } from '../stock/ledger';
import { unitEvent } from './history';
import { toDate } from './planning';

type Db = Knex | Knex.Transaction;

/** Assemblers with their skills and daily capacity (no profile yet: no skills, no capacity). */
export async function listAssemblers(db: Db): Promise<PlanAssembler[]> {
  const rows = await db('users as u').leftJoin('assembler_profiles as p', 'p.user_id', 'u.id')
    .where({ 'u.role': 'assembler', 'u.active': true }).select('u.id', 'u.name', 'p.skills', 'p.daily_capacity_minutes').orderBy('u.name');
  return rows.map((r) => ({ id: r.id, name: r.name, skills: r.skills ?? [], dailyCapacityMinutes: r.daily_capacity_minutes ?? 0 }));
}

export async function updateAssemblerProfile(knex: Knex, userId: number, input: AssemblerProfileInput) {
  const user = await knex('users').where({ id: userId, role: 'assembler' }).first();
  if (!user) throw notFound('No such assembler');
  await knex('assembler_profiles').insert({ user_id: userId, skills: input.skills, daily_capacity_minutes: input.dailyCapacityMinutes })
    .onConflict('user_id').merge();
  return (await listAssemblers(knex)).find((a) => a.id === userId)!;
}

/** One job per open, unbuilt unit of a batch: the revision's standard minutes and skills, and its order's due date. */
async function batchJobs(db: Db, batchId: number): Promise<PlanJob[]> {
  const batch = await db('batches').where({ id: batchId }).first();
  if (!batch) throw notFound('No such batch');
  const steps = await db('build_steps').where({ revision_id: batch.revision_id }).select('standard_minutes', 'skill');
  const minutes = steps.reduce((s: number, x: { standard_minutes: number }) => s + x.standard_minutes, 0);
  const skills = [...new Set(steps.map((s: { skill: string }) => s.skill))] as string[];
  const units = await db('units as u').leftJoin('orders as o', 'o.id', 'u.order_id').where('u.batch_id', batchId)
    .whereIn('u.state', ['waiting']).select('u.id', 'o.due_at');
  return units.map((u) => ({ unitId: u.id, minutes, skills, dueDate: u.due_at ? new Date(u.due_at).toISOString().slice(0, 10) : null }));
}

/** The proposed plan for a batch's waiting units, with load per assembler per day. */
export async function proposeBatchPlan(db: Db, batchId: number, startDate?: string) {
  const start = workingDayOnOrAfter(startDate ?? new Date().toISOString().slice(0, 10));
  const [jobs, assemblers] = await Promise.all([batchJobs(db, batchId), listAssemblers(db)]);
  const plan = proposePlan(jobs, assemblers, start);
  return { startDate: start, jobs, assemblers, ...plan };
}

/** Applies a plan (proposed, edited or by hand): each unit gets its assembler and day; all or nothing. */
export async function applyAssignments(knex: Knex, userId: number, batchId: number, input: ApplyAssignmentsInput) {
  return knex.transaction(async (trx) => {
    const batch = await lockBatchRow(trx, batchId);
    if (!['released', 'on_bench'].includes(batch.state)) throw conflict('Assign builds once the batch is released');
    const assemblers = await listAssemblers(trx);
    const byId = new Map(assemblers.map((a) => [a.id, a]));
    const jobs = await batchJobs(trx, batchId);
    const units = await lockUnitRows(trx, input.builds.map((b) => b.unitId));
    const unitById = new Map(units.map((u) => [u.id, u]));
    for (const [i, b] of input.builds.entries()) {
      const unit = unitById.get(b.unitId);
      if (!unit || unit.batch_id !== batchId) throw invalid('A unit is not in this batch', { [`builds.${i}.unitId`]: 'Not in this batch' });
      const a = byId.get(b.assemblerId);
      if (!a) throw invalid('Assign to an assembler', { [`builds.${i}.assemblerId`]: 'Not an assembler' });
      if (!['waiting', 'rework'].includes(unit.state)) throw conflict(`Unit ${unit.serial} is already being built: it keeps its builder`);
      const job = jobs.find((j) => j.unitId === unit.id);
      if (job && !job.skills.every((s) => a.skills.includes(s))) {
        throw invalid(`${a.name} lacks a skill this build needs (${job.skills.filter((s) => !a.skills.includes(s)).join(', ')})`, { [`builds.${i}.assemblerId`]: 'Missing a skill' });
      }
    }
    const format = shopFormatter(await getSettings(trx));
    const sorted = [...input.builds].sort((x, y) => (x.date < y.date ? -1 : x.date > y.date ? 1 : x.unitId - y.unitId));
    for (const [position, b] of sorted.entries()) {
      const a = byId.get(b.assemblerId)!;
      await trx('units').where({ id: b.unitId }).update({ assembler_id: b.assemblerId, planned_date: b.date, queue_position: position, updated_at: trx.fn.now() });
      await unitEvent(trx, b.unitId, 'assigned', `Assigned to ${a.name} for ${format.date(b.date)}`, userId);
    }
    return { assigned: input.builds.length, ...assessPlan(input.builds, jobs, assemblers) };
  });
}

/** The estimated ship date of each order in a plan: the day after its last unit is built and tested. */
export function shipDates(builds: { unitId: number; date: string }[], unitOrders: Map<number, number | null>) {
  const last = new Map<number, string>();
  for (const b of builds) {
    const orderId = unitOrders.get(b.unitId);
    if (!orderId) continue;
    if (!last.has(orderId) || b.date > last.get(orderId)!) last.set(orderId, b.date);
  }
  return last;
}

export { toDate };
