// The order desk's search and CSV export: q finds an order by its number, the customer's name or
// e-mail, or a serial of one of its units; the export is the same filtered list, every page of it.
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp, uniqueEmail, type TestAgent } from '../support/app';
import { demoOption, insertBatch, insertOrder } from './spec-sheets-setup';

const t = startTestApp();
let planner: TestAgent;
let customer: { id: number; name: string; email: string };
let orders: { id: number; number: string }[];
let serials: string[];

beforeAll(async () => {
  planner = await signedInAgent(t.app, DEMO.planner);
  const email = uniqueEmail('desk');
  // A name a spreadsheet would take for a formula: the export must keep it as text.
  const name = `=HYPERLINK("x") Ada Quillfeather ${process.pid}`;
  const [user] = await t.knex('users').insert({ name, email, role: 'customer', password_hash: 'not-a-real-hash' }).returning('id');
  customer = { id: user.id, name, email };
  const option = await demoOption(t.knex);
  orders = [];
  for (let i = 0; i < 3; i++) {
    const { orderId } = await insertOrder(t.knex, customer.id, option.optionId, 2);
    orders.push(await t.knex('orders').where({ id: orderId }).first('id', 'number'));
  }
  const line = await t.knex('order_lines').where({ order_id: orders[1].id }).first('id');
  const batch = await insertBatch(t.knex, [{ vf: [0.62, 1.81] }, { vf: [0.63, 1.8] }], { orderId: orders[1].id, orderLineId: line.id });
  serials = batch.units.map((u) => u.serial);
});
afterAll(() => t.stop());

const search = async (q: string, extra = '') => (await planner.get(`/api/orders?q=${encodeURIComponent(q)}&pageSize=100${extra}`).expect(200)).body;
const numbers = (body: { items: { number: string }[] }) => body.items.map((o) => o.number).sort();

describe('order desk search', () => {
  it('finds the order of a unit by its serial, as a customer reads it off the base plate, in any letter case', async () => {
    for (const q of [serials[0], serials[1].toLowerCase(), ` ${serials[0]} `]) {
      const body = await search(q);
      expect(body.total, q).toBe(1);
      expect(numbers(body)).toEqual([orders[1].number]);
    }
  });

  it('finds orders by order number, customer e-mail and customer name', async () => {
    expect(numbers(await search(orders[2].number))).toEqual([orders[2].number]);
    expect(numbers(await search(customer.email.toUpperCase()))).toEqual(orders.map((o) => o.number).sort());
    expect(numbers(await search(`Quillfeather ${process.pid}`))).toEqual(orders.map((o) => o.number).sort());
  });

  it('takes wildcards literally and matches nothing made up', async () => {
    expect((await search('%')).items.every((o: { number: string; customer_name: string; customer_email: string }) =>
      `${o.number}${o.customer_name}${o.customer_email}`.includes('%'))).toBe(true);
    expect((await search(`${serials[0]}-no-such-unit`)).total).toBe(0);
  });
});

describe('order desk CSV export', () => {
  it('exports every order the filters match, not one page, with serials, and keeps formula-like names as text', async () => {
    const res = await planner.get(`/api/orders/export.csv?q=${encodeURIComponent(customer.email)}&page=2&pageSize=1&sort=number&dir=asc`).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="orders\.csv"/);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    expect(rows.map((r) => r['order number'])).toEqual([...orders].sort((a, b) => a.id - b.id).map((o) => o.number));
    const withUnits = rows.find((r) => r['order number'] === orders[1].number)!;
    expect(withUnits.serials.split(' ').sort()).toEqual([...serials].sort());
    expect(withUnits.units).toBe('2');
    expect(withUnits['e-mail']).toBe(customer.email);
    expect(withUnits.total).toBe('409.00'); // the fixture's 2 × €200.00 plus €9.00 shipping
    // csv-stringify's escape_formulas prefixes a leading = with a single quote (its documented behaviour).
    expect(withUnits.customer).toBe(`'${customer.name}`);
  });

  it('applies the same filters as the list: a serial search exports that one order', async () => {
    const res = await planner.get(`/api/orders/export.csv?q=${encodeURIComponent(serials[1])}`).expect(200);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    expect(rows.map((r) => r['order number'])).toEqual([orders[1].number]);
    const none = parse((await planner.get(`/api/orders/export.csv?q=${encodeURIComponent(serials[1])}&state=cancelled`).expect(200)).text, { columns: true });
    expect(none).toEqual([]);
  });

  it('refuses unknown or bad parameters with 400, as the list does, and is closed to customers', async () => {
    const bad = await planner.get('/api/orders/export.csv?colour=red');
    expect(bad.status).toBe(400);
    expect((await planner.get('/api/orders/export.csv?from=2026-02-31')).status).toBe(400);
    const shopper = await signedInAgent(t.app, DEMO.customer);
    expect((await shopper.get('/api/orders/export.csv')).status).toBe(403);
  });
});
