import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { ADDRESS, insertPedal, placeOrder, settingsRow, type PedalFixture } from './orders-fixtures';

const t = startTestApp();
let pedal: PedalFixture;
let customer: TestAgent;
let other: TestAgent;
let planner: TestAgent;

beforeAll(async () => {
  pedal = await insertPedal(t.knex);
  customer = await signedInAgent(t.app, DEMO.customer);
  other = await signedInAgent(t.app, 'sam@mail.example');
  planner = await signedInAgent(t.app, DEMO.planner);
});
afterAll(() => t.stop());

describe('order pricing is the server’s alone', () => {
  it('prices base + surcharge per unit, shipping once from the destination’s zone, domestic VAT per line', async () => {
    const s = await settingsRow(t.knex);
    const zone = (await t.knex('shipping_zones').whereRaw("'DE' = ANY(countries)").first('rate_cents'));
    const { order, lines } = await placeOrder(customer, pedal, 2, 'led');
    const unit = pedal.basePriceCents + pedal.surcharges.led;
    // The demo shop is in Germany with tax-inclusive prices: a German order pays the catalog price.
    expect(s.home_country).toBe('DE');
    expect(s.prices_include_tax).toBe(true);
    expect(lines).toMatchObject([{ quantity: 2, unit_price_cents: unit, line_total_cents: 2 * unit, tax_rate_basis_points: 1900 }]);
    const line = lines[0] as { net_cents: number; tax_cents: number };
    expect(line.net_cents + line.tax_cents).toBe(2 * unit);
    expect(line.net_cents).toBe(Math.round((2 * unit * 10_000) / 11_900));
    expect(order.subtotalCents).toBe(2 * unit);
    expect(order.shippingCents).toBe(zone.rate_cents);
    expect(order.totalCents).toBe(2 * unit + zone.rate_cents);
    const shippingTax = zone.rate_cents - Math.round((zone.rate_cents * 10_000) / 11_900);
    expect(order.taxCents).toBe(line.tax_cents + shippingTax);
    expect(order.state).toBe('awaiting_payment');
    expect(order.number).toMatch(new RegExp(`^${s.order_number_prefix}-\\d{5,}$`));
  });

  it('ignores prices, totals and states a client slips into the request', async () => {
    const res = await customer.post('/api/orders').set('X-CSRF-Token', customer.csrf).send({
      lines: [{ modelId: pedal.modelId, optionId: pedal.options.silicon, quantity: 1, unitPriceCents: 1, lineTotalCents: 1, surchargeCents: -5000 }],
      shipping: ADDRESS,
      subtotalCents: 1, shippingCents: 0, taxCents: 0, totalCents: 1, state: 'paid', currency: 'JPY',
    });
    expect(res.status).toBe(201);
    const row = await t.knex('orders').where({ id: res.body.order.id }).first();
    expect(row.subtotal_cents).toBe(pedal.basePriceCents);
    expect(row.total_cents).toBeGreaterThan(pedal.basePriceCents);
    expect(row.state).toBe('awaiting_payment');
    expect(row.currency).toBe((await settingsRow(t.knex)).currency);
  });

  it('follows a price change for new orders but keeps placed orders at their price', async () => {
    const { order } = await placeOrder(customer, pedal, 1, 'silicon');
    await t.knex('models').where({ id: pedal.modelId }).update({ base_price_cents: pedal.basePriceCents + 1_000 });
    const quote = await customer.post('/api/shop/quote').set('X-CSRF-Token', customer.csrf)
      .send({ lines: [{ modelId: pedal.modelId, optionId: pedal.options.silicon, quantity: 1 }] }).expect(200);
    expect(quote.body.subtotalCents).toBe(pedal.basePriceCents + 1_000);
    const detail = await customer.get(`/api/orders/${order.id}`).expect(200);
    expect(detail.body.order.subtotalCents).toBe(pedal.basePriceCents);
    await t.knex('models').where({ id: pedal.modelId }).update({ base_price_cents: pedal.basePriceCents });
  });

  it('refuses unpublished options, options of another model and bad addresses with field messages', async () => {
    const hidden = await customer.post('/api/orders').set('X-CSRF-Token', customer.csrf)
      .send({ lines: [{ modelId: pedal.modelId, optionId: pedal.options.hidden, quantity: 1 }], shipping: ADDRESS });
    expect(hidden.status).toBe(400);
    expect(hidden.body.error.fields['lines.0.optionId']).toMatch(/not on sale/);

    const otherPedal = await insertPedal(t.knex);
    const mixed = await customer.post('/api/orders').set('X-CSRF-Token', customer.csrf)
      .send({ lines: [{ modelId: pedal.modelId, optionId: otherPedal.options.led, quantity: 1 }], shipping: ADDRESS });
    expect(mixed.status).toBe(400);

    const before = await t.knex('orders').count({ n: '*' }).first();
    const bad = await customer.post('/api/orders').set('X-CSRF-Token', customer.csrf).send({
      lines: [{ modelId: pedal.modelId, optionId: pedal.options.led, quantity: 21 }],
      shipping: { ...ADDRESS, name: '', postcode: '<script>', country: 'Germany' },
    });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toMatchObject({
      'lines.0.quantity': expect.stringMatching(/20/), 'shipping.name': expect.any(String),
      'shipping.postcode': expect.any(String), 'shipping.country': expect.any(String),
    });
    const after = await t.knex('orders').count({ n: '*' }).first();
    expect(after?.n).toBe(before?.n);
  });
});

describe('who sees which order', () => {
  it('answers 404 for another customer’s order, and staff see every order', async () => {
    const { order } = await placeOrder(customer, pedal);
    await other.get(`/api/orders/${order.id}`).expect(404);
    await other.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', other.csrf).send({}).expect(404);
    await other.post(`/api/orders/${order.id}/checkout`).set('X-CSRF-Token', other.csrf).send({}).expect(404);
    const mine = await other.get('/api/orders/mine').expect(200);
    expect(mine.body.items.map((o: { id: number }) => o.id)).not.toContain(order.id);
    const own = await customer.get('/api/orders/mine').expect(200);
    expect(own.body.items.map((o: { id: number }) => o.id)).toContain(order.id);
    const staff = await planner.get(`/api/orders/${order.id}`).expect(200);
    expect(staff.body.order.customer.email).toBe(DEMO.customer);
    const assembler = await signedInAgent(t.app, DEMO.assembler);
    await assembler.get(`/api/orders/${order.id}`).expect(404);
  });

  it('filters the staff list by state, option, date and search on the server', async () => {
    const led = await placeOrder(customer, pedal, 1, 'led');
    const si = await placeOrder(other, pedal, 1, 'silicon');
    const byOption = await planner.get(`/api/orders?optionId=${pedal.options.silicon}`).expect(200);
    const ids = byOption.body.items.map((o: { id: number }) => o.id);
    expect(ids).toContain(si.order.id);
    expect(ids).not.toContain(led.order.id);
    const bySearch = await planner.get(`/api/orders?q=${encodeURIComponent(si.order.number)}`).expect(200);
    expect(bySearch.body.items.map((o: { id: number }) => o.id)).toEqual([si.order.id]);
    const byName = await planner.get('/api/orders?q=whitlow').expect(200);
    expect(byName.body.items.every((o: { customer_name: string }) => o.customer_name === 'Sam Whitlow')).toBe(true);
    const paid = await planner.get('/api/orders?state=paid').expect(200);
    expect(paid.body.items.map((o: { id: number }) => o.id)).not.toContain(led.order.id);
    const today = new Date().toISOString().slice(0, 10);
    const future = await planner.get('/api/orders?from=2999-01-01').expect(200);
    expect(future.body.items).toEqual([]);
    const since = await planner.get(`/api/orders?from=${today.slice(0, 8)}01`).expect(200);
    expect(since.body.items.map((o: { id: number }) => o.id)).toContain(led.order.id);
    await planner.get('/api/orders?state=lost').expect(400);
  });

  it('keeps staff notes from customers and lists them in the history for staff', async () => {
    const { order } = await placeOrder(customer, pedal);
    await planner.post(`/api/orders/${order.id}/notes`).set('X-CSRF-Token', planner.csrf).send({ note: 'Customer asked for a matte enclosure' }).expect(201);
    await planner.post(`/api/orders/${order.id}/notes`).set('X-CSRF-Token', planner.csrf).send({ note: '' }).expect(400);
    const staff = await planner.get(`/api/orders/${order.id}`).expect(200);
    expect(staff.body.order.staffNotes).toContain('matte enclosure');
    expect(staff.body.events.map((e: { kind: string }) => e.kind)).toEqual(['placed', 'note']);
    const own = await customer.get(`/api/orders/${order.id}`).expect(200);
    expect(own.body.order.staffNotes).toBeUndefined();
    expect(JSON.stringify(own.body)).not.toContain('matte enclosure');
  });
});
