// Catalog rows the ordering tests price against: their own model and options, so the tests do not
// depend on the demo catalog's prices. Values are invented for the tests.
import type { Knex } from 'knex';
import type { TestAgent } from '../support/app';

export interface PedalFixture {
  modelId: number;
  basePriceCents: number;
  options: { silicon: number; led: number; hidden: number };
  surcharges: { silicon: number; led: number };
}

let counter = 0;

export async function insertPedal(knex: Knex, basePriceCents = 17_900): Promise<PedalFixture> {
  const tag = `${process.pid}-${Date.now()}-${counter++}`;
  const [model] = await knex('models').insert({ name: `Test Drive ${tag}`, sku: `T-${tag}`, base_price_cents: basePriceCents, published: true }).returning('id');
  const option = async (code: string, name: string, surcharge: number, published = true) => {
    const [row] = await knex('clipping_options').insert({
      model_id: model.id, code, name, topology: 'shunt', network: JSON.stringify({ seriesOhms: 2200 }), price_surcharge_cents: surcharge, published,
    }).returning('id');
    return row.id as number;
  };
  return {
    modelId: model.id,
    basePriceCents,
    options: { silicon: await option('SI2', 'Silicon pair', 0), led: await option('LED2', 'Red LED pair', 1_200), hidden: await option('GE2', 'Germanium pair', 2_400, false) },
    surcharges: { silicon: 0, led: 1_200 },
  };
}

export const ADDRESS = { name: 'Dee Castellano', line1: 'Rauchgasse 12', line2: '', city: 'Leipzig', postcode: '04109', country: 'de', phone: '+49 341 555 0101' };

/** Places an order through the API as the given customer; returns the response body. */
export async function placeOrder(agent: TestAgent, pedal: PedalFixture, quantity = 1, option: 'silicon' | 'led' = 'led') {
  const res = await agent.post('/api/orders').set('X-CSRF-Token', agent.csrf)
    .send({ lines: [{ modelId: pedal.modelId, optionId: pedal.options[option], quantity }], shipping: ADDRESS });
  if (res.status !== 201) throw new Error(`placing an order failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { order: { id: number; number: string; state: string; totalCents: number; subtotalCents: number; shippingCents: number; taxCents: number }; lines: unknown[] };
}

export async function settingsRow(knex: Knex) {
  return knex('settings').where({ id: 1 }).first();
}
