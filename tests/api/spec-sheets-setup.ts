// Units for the spec sheet tests, made by direct inserts the way production's services leave them
// (a released batch, fitted devices with measured Vf, the unit's predicted profile, a build event).
import type { Knex } from 'knex';
import { unitSerial } from '../../shared/production/serials';
import { predictUnit } from '../../server/services/production/unit-circuit';
import type { TestAgent } from '../support/app';

export async function userId(knex: Knex, email: string) {
  return (await knex('users').where({ email }).first('id')).id as number;
}

/** The Saltmarsh Drive's active revision and its "Silicon against LED" option (from the catalog seed). */
export async function demoOption(knex: Knex, code = 'ASYM', sku = 'HM-SMD') {
  const model = await knex('models').where({ sku }).first('id', 'name', 'active_revision_id');
  const option = await knex('clipping_options').where({ model_id: model.id, code }).first('id', 'name');
  const slots = await knex('option_devices').where({ option_id: option.id }).orderBy(['side', 'position']).select('id', 'side', 'position');
  return { modelName: model.name as string, revisionId: model.active_revision_id as number, optionId: option.id as number, optionName: option.name as string, slots };
}

/** An order for a customer (paid, in production), so units can belong to it. */
export async function insertOrder(knex: Knex, customerId: number, optionId: number, quantity: number) {
  const option = await knex('clipping_options').where({ id: optionId }).first('model_id');
  const [order] = await knex('orders').insert({
    number: `T-${Date.now() % 1e8}-${Math.floor(Math.random() * 1e4)}`, customer_id: customerId, state: 'in_production', currency: 'EUR',
    subtotal_cents: 20_000 * quantity, shipping_cents: 900, tax_cents: 0, total_cents: 20_000 * quantity + 900,
    ship_name: 'Test Customer', ship_line1: 'Teststraße 1', ship_city: 'Berlin', ship_postcode: '10115', ship_country: 'DE', paid_at: new Date(),
  }).returning('id');
  const [line] = await knex('order_lines').insert({ order_id: order.id, model_id: option.model_id, option_id: optionId, quantity, unit_price_cents: 20_000, line_total_cents: 20_000 * quantity, description: 'Test pedal' }).returning('id');
  return { orderId: order.id as number, orderLineId: line.id as number };
}

export interface UnitPlan {
  /** Measured Vf per device slot in (side, position) order; null = no reading taken. */
  vf: (number | null)[];
  state?: 'building' | 'built' | 'passed';
}

/** A batch of units on one option; each unit built (by the demo assembler) with the given readings. */
export async function insertBatch(knex: Knex, units: UnitPlan[], opts: { optionCode?: string; orderId?: number; orderLineId?: number } = {}) {
  const option = await demoOption(knex, opts.optionCode);
  const assembler = await userId(knex, 'assembler@shop.example');
  const { rows } = await knex.raw('SELECT nextval(\'batch_number_seq\')::int AS n');
  const number = rows[0].n as number;
  const [batch] = await knex('batches').insert({ number, revision_id: option.revisionId, state: 'on_bench', released_at: new Date() }).returning('id');
  const [line] = await knex('batch_lines').insert({ batch_id: batch.id, option_id: option.optionId, order_line_id: opts.orderLineId ?? null, quantity: units.length }).returning('id');
  const made: { id: number; serial: string }[] = [];
  for (const [i, plan] of units.entries()) {
    const serial = unitSerial('HM', number, i + 1);
    const [unit] = await knex('units').insert({
      serial, batch_id: batch.id, sequence: i + 1, batch_line_id: line.id, option_id: option.optionId, order_id: opts.orderId ?? null,
      state: plan.state ?? 'built', assembler_id: assembler,
    }).returning('id');
    const measured = new Map<number, number>();
    for (const [k, slot] of option.slots.entries()) {
      const vf = plan.vf[k];
      if (vf === null || vf === undefined) continue;
      measured.set(slot.id, vf);
      await knex('unit_devices').insert({ unit_id: unit.id, option_device_id: slot.id, measured_vf: vf, test_current_ma: 1, user_id: assembler });
    }
    if (measured.size > 0 && plan.vf.every((v) => v !== null && v < 5)) {
      await knex('units').where({ id: unit.id }).update({ predicted: JSON.stringify(await predictUnit(knex, option.revisionId, option.optionId, measured, 1)) });
    }
    if ((plan.state ?? 'built') !== 'building') {
      await knex('unit_events').insert({ unit_id: unit.id, kind: 'state-change', from_state: 'building', to_state: 'built', message: 'build finished', user_id: assembler, created_at: new Date('2026-11-27T10:00:00Z') });
    }
    made.push({ id: unit.id, serial });
  }
  return { batchId: batch.id as number, number, option, units: made };
}

/** GET a binary body (PDF, zip) as a Buffer, expecting the status. */
export async function fetchBinary(agent: TestAgent, url: string, status = 200) {
  const res = await agent.get(url).buffer(true).parse((r, done) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(Buffer.from(c)));
    r.on('end', () => done(null, Buffer.concat(chunks)));
  }).expect(status);
  return { body: res.body as Buffer, headers: res.headers };
}
