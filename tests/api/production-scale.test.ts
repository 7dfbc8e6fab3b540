import { afterAll, describe, expect, it } from 'vitest';
import { performance } from 'node:perf_hooks';
import { getBatch, createBatch } from '../../server/services/production/planning';
import { releaseBatch } from '../../server/services/production/release';
import { proposeBatchPlan } from '../../server/services/production/assignment';
import { startTestApp } from '../support/app';

// A figure, not a timed assertion: how long planning and releasing a 200-unit batch across four
// clipping options takes on the demo catalog. Printed for the issue note.
const t = startTestApp();
afterAll(() => t.stop());

describe('a 200-unit batch on the demo data', () => {
  it('plans, releases and proposes a plan, and prints the time each took', async () => {
    const model = await t.knex('models as m').whereNotNull('m.active_revision_id')
      .whereRaw('(SELECT COUNT(*) FROM clipping_options c WHERE c.model_id = m.id) >= 4').orderBy('m.sku').first('m.id', 'm.name', 'm.active_revision_id');
    expect(model, 'the demo catalog has a model with four options').toBeTruthy();
    const options = await t.knex('clipping_options').where({ model_id: model.id }).orderBy(['position', 'id']).limit(4);
    const planner = await t.knex('users').where({ email: 'planner@shop.example' }).first();

    const started = performance.now();
    const { id } = await createBatch(t.knex, planner.id, { revisionId: model.active_revision_id, orderLineIds: [], notes: 'scale run', stockBuilds: options.map((o) => ({ optionId: o.id, quantity: 50 })) });
    const plan = await getBatch(t.knex, id);
    const planned = performance.now();
    const released = await releaseBatch(t.knex, planner.id, id, { overrideReason: 'scale run: stock not checked' });
    const releasedAt = performance.now();
    const proposal = await proposeBatchPlan(t.knex, id);
    const proposedAt = performance.now();

    expect(released.units).toBe(200);
    expect(plan.requirements.length).toBeGreaterThan(10);
    const serials = await t.knex('units').where({ batch_id: id }).orderBy('sequence').pluck('sequence');
    expect(serials).toEqual(Array.from({ length: 200 }, (_, i) => i + 1));
    expect(proposal.builds.length + proposal.unassignable.length).toBe(200);
    console.log(`[production] 200 units × 4 options of ${model.name}: plan (batch + exploded BOM, ${plan.requirements.length} parts) ${(planned - started).toFixed(0)} ms; `
      + `release (freeze, 200 serials, plan for ship dates) ${(releasedAt - planned).toFixed(0)} ms; proposed LPT plan ${(proposedAt - releasedAt).toFixed(0)} ms; total ${(proposedAt - started).toFixed(0)} ms`);
  });
});
