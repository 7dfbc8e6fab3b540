import type { Knex } from 'knex';
import { findPreset } from '../../shared/engine';
import { appendMovements } from '../../server/services/stock/ledger';

// A small catalog of our own per test (unique names), so production tests do not lean on the
// demo seeds: two base parts (one asks for a lot), a silicon diode and a red LED as clipping
// devices with their parts, one revision with three build steps and two options.
let counter = 0;

export async function makeCatalog(knex: Knex, opts: { stock?: number; diodeStock?: number; ledStock?: number } = {}) {
  const tag = `${process.pid % 10000}-${Date.now() % 1_000_000}-${counter++}`;
  const [supplier] = await knex('suppliers').insert({ name: `Test Supplies ${tag}`, default_lead_time_days: 5 }).returning('id');
  const part = async (pn: string, category: string, lead: number, qty: number) => {
    const [p] = await knex('parts').insert({ part_number: `${pn}-${tag}`, category, value: pn, supplier_id: supplier.id, unit_cost_cents: 25, lead_time_days: lead }).returning('id');
    if (qty > 0) await knex.transaction((trx) => appendMovements(trx, [{ partId: p.id, kind: 'receive', quantity: qty, reason: 'test stock' }]));
    return p.id as number;
  };
  const pcb = await part('PCB', 'pcb', 10, opts.stock ?? 50);
  const opamp = await part('OPAMP', 'ic', 14, opts.stock ?? 50);
  const diode = await part('DIODE', 'diode', 3, opts.diodeStock ?? 200);
  const led = await part('LED', 'led', 3, opts.ledStock ?? 200);
  const si = findPreset('si-small-signal')!.model;
  const red = findPreset('led-red')!.model;
  const [siDevice] = await knex('devices').insert({ name: `Si ${tag}`, kind: 'silicon', is_amps: si.is, n: si.n, rs_ohms: si.rs ?? 0, provenance: 'test', part_id: diode }).returning('id');
  const [ledDevice] = await knex('devices').insert({ name: `Red LED ${tag}`, kind: 'led', is_amps: red.is, n: red.n, rs_ohms: red.rs ?? 0, provenance: 'test', part_id: led }).returning('id');
  const [model] = await knex('models').insert({ name: `Test Drive ${tag}`, sku: `TD-${tag}`, base_price_cents: 19900, published: true }).returning('id');
  const [revision] = await knex('model_revisions').insert({ model_id: model.id, number: 1, drive_min_gain: 1, drive_max_gain: 200, drive_taper: 'audio', input_peak_v: 0.1, supply_v: 9, reference_drive: 0.5 }).returning('id');
  await knex('models').where({ id: model.id }).update({ active_revision_id: revision.id });
  const [pcbLine] = await knex('bom_lines').insert({ revision_id: revision.id, part_id: pcb, quantity: 1, needs_lot: true, position: 1 }).returning('id');
  await knex('bom_lines').insert({ revision_id: revision.id, part_id: opamp, quantity: 1, position: 2 });
  const steps = await knex('build_steps').insert([
    { revision_id: revision.id, position: 1, title: 'Populate the board', standard_minutes: 60, skill: 'through-hole', soldering: true, safety_note: 'Hot iron' },
    { revision_id: revision.id, position: 2, title: 'Match the clipping devices', standard_minutes: 20, skill: 'device-matching' },
    { revision_id: revision.id, position: 3, title: 'Box it up', standard_minutes: 40, skill: 'enclosure' },
  ]).returning('id');
  const network = { seriesOhms: 2200, shuntFarads: 0 };
  const [sym] = await knex('clipping_options').insert({ model_id: model.id, code: 'SI2', name: 'Silicon pair', topology: 'shunt', network: JSON.stringify(network), published: true }).returning('id');
  const [asym] = await knex('clipping_options').insert({ model_id: model.id, code: 'SIL', name: 'Silicon against red LED', topology: 'shunt', network: JSON.stringify(network), published: true, position: 1 }).returning('id');
  const symDevices = await knex('option_devices').insert([
    { option_id: sym.id, side: 'positive', position: 0, device_id: siDevice.id },
    { option_id: sym.id, side: 'negative', position: 0, device_id: siDevice.id },
  ]).returning('id');
  await knex('option_devices').insert([
    { option_id: asym.id, side: 'positive', position: 0, device_id: siDevice.id },
    { option_id: asym.id, side: 'negative', position: 0, device_id: ledDevice.id },
  ]);
  return {
    tag, modelId: model.id as number, revisionId: revision.id as number, parts: { pcb, opamp, diode, led },
    options: { sym: sym.id as number, asym: asym.id as number }, symDevices: symDevices.map((d: { id: number }) => d.id),
    steps: steps.map((s: { id: number }) => s.id), pcbLine: pcbLine.id as number,
  };
}

/** A paid order from the demo customer for a model and option. */
export async function makePaidOrder(knex: Knex, modelId: number, optionId: number, quantity = 1, dueAt = '2027-01-29') {
  const customer = await knex('users').where({ email: 'customer@shop.example' }).first();
  const [order] = await knex('orders').insert({
    number: `T-${Date.now() % 1e8}-${counter++}`, customer_id: customer.id, state: 'paid', currency: 'EUR', subtotal_cents: 19900 * quantity, shipping_cents: 0, tax_cents: 0,
    total_cents: 19900 * quantity, ship_name: 'Dee Castellano', ship_line1: 'Lindenhof 3', ship_city: 'Leipzig', ship_postcode: '04109', ship_country: 'DE', paid_at: new Date(), due_at: dueAt,
  }).returning('*');
  const [line] = await knex('order_lines').insert({ order_id: order.id, model_id: modelId, option_id: optionId, quantity, unit_price_cents: 19900, line_total_cents: 19900 * quantity, description: 'Test Drive — option' }).returning('id');
  return { orderId: order.id as number, number: order.number as string, lineId: line.id as number };
}

export async function available(knex: Knex, partId: number) {
  return (await knex('part_stock').where({ part_id: partId }).first()).available as number;
}
