import type { Knex } from 'knex';
import type { SessionUser } from '../shared/roles';
import { applyAssignments, proposeBatchPlan } from '../server/services/production/assignment';
import { finishStep, markBuilt, recordLots, recordReadings, startStep } from '../server/services/production/building';
import { createBatch } from '../server/services/production/planning';
import { releaseBatch } from '../server/services/production/release';
import { kitBatch, reserveForBatch } from '../server/services/production/stock';
import { recordTest } from '../server/services/production/testing';
import { nominalVf, optionDevices } from '../server/services/production/unit-circuit';
import { workingDayOnOrAfter } from '../shared/production/schedule';

// The demo bench: skills and daily capacity of the three assemblers, and one stock batch in
// progress with units in several states. Leaves paid customer orders alone (those are for the
// planner to batch). Idempotent: profiles are only added, the batch only when none exists.
// Skips the batch when the catalog seed has not run.
const PROFILES = [
  { email: 'assembler@shop.example', skills: ['through-hole', 'smd-rework', 'device-matching', 'enclosure', 'final-check'], minutes: 420 },
  { email: 'priya@shop.example', skills: ['through-hole', 'device-matching', 'final-check', 'enclosure'], minutes: 360 },
  { email: 'lukas@shop.example', skills: ['through-hole', 'enclosure', 'smd-rework', 'final-check', 'device-matching'], minutes: 240 },
];

const asUser = (row: { id: number; email: string; name: string; role: string }) => ({ id: row.id, email: row.email, name: row.name, role: row.role }) as SessionUser;

export async function seed(knex: Knex): Promise<void> {
  for (const p of PROFILES) {
    const user = await knex('users').where({ email: p.email }).first();
    if (user) await knex('assembler_profiles').insert({ user_id: user.id, skills: p.skills, daily_capacity_minutes: p.minutes }).onConflict('user_id').ignore();
  }
  if (await knex('batches').first()) return;
  const model = await knex('models').whereNotNull('active_revision_id').where({ published: true }).orderBy('sku').first();
  if (!model) return;
  const options = await knex('clipping_options').where({ model_id: model.id }).orderBy(['position', 'id']).limit(2);
  if (!options.length) return;
  const planner = asUser(await knex('users').where({ email: 'planner@shop.example' }).first());
  const tester = asUser(await knex('users').where({ email: 'tester@shop.example' }).first());

  const { id: batchId } = await createBatch(knex, planner.id, {
    revisionId: model.active_revision_id, orderLineIds: [], notes: 'Demo stock batch',
    stockBuilds: options.map((o) => ({ optionId: o.id, quantity: 3 })),
  });
  const start = workingDayOnOrAfter(new Date(Date.now() - 3 * 86_400_000).toISOString().slice(0, 10));
  await releaseBatch(knex, planner.id, batchId, { startDate: start, overrideReason: 'demo stock batch' });
  await reserveForBatch(knex, planner.id, batchId);
  await kitBatch(knex, planner.id, batchId);
  const plan = await proposeBatchPlan(knex, batchId, start);
  if (plan.builds.length < 4) return;
  await applyAssignments(knex, planner.id, batchId, { builds: plan.builds });
  const units = await knex('units').where({ batch_id: batchId }).whereNotNull('assembler_id').orderBy('sequence');

  const settings = await knex('settings').where({ id: 1 }).first();
  const revision = await knex('model_revisions').where({ id: model.active_revision_id }).first();
  const steps = await knex('build_steps').where({ revision_id: revision.id }).orderBy('position');
  const lotLines = await knex('bom_lines').where({ revision_id: revision.id, needs_lot: true }).select('id');

  /** Builds a unit through every step, as its assembler would, with readings a little off nominal. */
  async function build(unit: { id: number; option_id: number; assembler_id: number }, offsetMv: number) {
    const who = asUser(await knex('users').where({ id: unit.assembler_id }).first());
    for (const step of steps) {
      await startStep(knex, who, unit.id, step.id);
      await finishStep(knex, who, unit.id, step.id, { confirmFast: true });
      // Spread the demo's step times around the standard so actual vs standard shows something.
      await knex('unit_steps').where({ unit_id: unit.id, step_id: step.id })
        .update({ started_at: knex.raw(`finished_at - make_interval(mins => ?)`, [Math.round(step.standard_minutes * (0.9 + 0.05 * (offsetMv % 5)))]), actual_minutes: Math.round(step.standard_minutes * (0.9 + 0.05 * (offsetMv % 5))) });
    }
    const devices = await optionDevices(knex, unit.option_id);
    if (devices.length) {
      await recordReadings(knex, who, unit.id, {
        readings: devices.map((d, i) => ({ optionDeviceId: d.id, vf: Number((nominalVf(d.model, settings.vf_test_current_ma) + (offsetMv + i * 3) / 1000).toFixed(3)) })),
        acceptOutOfRange: true,
      });
    }
    if (lotLines.length) await recordLots(knex, who, unit.id, { lots: lotLines.map((l: { id: number }, i: number) => ({ bomLineId: l.id, lot: `L26-11-${String(40 + i).padStart(3, '0')}` })) });
    await markBuilt(knex, who, unit.id);
    return (await knex('units').where({ id: unit.id }).first()).predicted?.thdPercent as number | undefined;
  }

  // Unit 1 passed, unit 2 failed back to rework, unit 3 built and waiting for the bench, unit 4 on the bench.
  const thd1 = await build(units[0], 4);
  await recordTest(knex, tester, units[0].id, { currentDrawMa: 7.4, measuredThdPercent: Number(((thd1 ?? 10) * 1.03).toFixed(2)), outcome: 'pass', reason: '' });
  const thd2 = await build(units[1], -6);
  await recordTest(knex, tester, units[1].id, { currentDrawMa: 18.9, measuredThdPercent: Number(((thd2 ?? 10) * 1.4).toFixed(2)), outcome: 'fail', reason: 'Current draw high: check the electrolytic at C12 for polarity' });
  await build(units[2], 2);
  const fourth = asUser(await knex('users').where({ id: units[3].assembler_id }).first());
  await startStep(knex, fourth, units[3].id, steps[0].id);
}
