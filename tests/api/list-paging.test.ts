import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { COUNT_CAP, PAGE_SIZE_MAX } from '../../shared/schemas/list';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { insertPedal, placeOrder } from './orders-fixtures';

// Every list endpoint shares one query shape (page, pageSize, sort, dir, q, filters) and one
// response shape {items, total, page, pageSize}. These check paging, sorting, filtering and 400s.
const t = startTestApp();
let planner: TestAgent;
let owner: TestAgent;
afterAll(() => t.stop());
beforeAll(async () => {
  planner = await signedInAgent(t.app, DEMO.planner);
  owner = await signedInAgent(t.app, DEMO.owner);
  // At least three orders so two pages of two exist, whatever else the test database holds.
  const customer = await signedInAgent(t.app, DEMO.customer);
  const pedal = await insertPedal(t.knex);
  for (let i = 0; i < 3; i++) await placeOrder(customer, pedal);
});

const ids = (body: { items: { id: number }[] }) => body.items.map((r) => r.id);

describe('paged lists', () => {
  it('pages orders without overlap and says how many match in all', async () => {
    const first = await planner.get('/api/orders?pageSize=2&page=1&sort=number&dir=asc').expect(200);
    const second = await planner.get('/api/orders?pageSize=2&page=2&sort=number&dir=asc').expect(200);
    expect(first.body).toMatchObject({ page: 1, pageSize: 2 });
    expect(first.body.items).toHaveLength(2);
    expect(second.body.total).toBe(first.body.total);
    // Counts stop at COUNT_CAP (a long test run can hold more orders than that).
    expect(first.body.total).toBe(Math.min(COUNT_CAP, Number((await t.knex('orders').count('* as n').first())!.n)));
    expect(ids(first.body).filter((id) => ids(second.body).includes(id))).toEqual([]);
    // Ascending by number = ascending by id; the second page continues the first.
    expect(Math.max(...ids(first.body))).toBeLessThan(Math.min(...ids(second.body)));
    // Past the last page there is nothing (when the count is exact; past the cap, more pages follow).
    const beyond = await planner.get(`/api/orders?pageSize=2&page=${Math.ceil(first.body.total / 2) + 1}`).expect(200);
    expect(beyond.body.items.length === 0).toBe(!first.body.totalCapped);
  });

  it('sorts on the server by a whitelisted key in either direction', async () => {
    const up = await planner.get('/api/orders?sort=totalCents&dir=asc&pageSize=100').expect(200);
    const totals = up.body.items.map((o: { total_cents: number }) => o.total_cents);
    expect(totals).toEqual([...totals].sort((a, b) => a - b));
    const down = await planner.get('/api/orders?sort=totalCents&dir=desc&pageSize=1').expect(200);
    // The first page up holds at most 100 of all the orders other test files also made: the largest overall
    // is at least its largest, and it is also the last of the last page up.
    expect(down.body.items[0].total_cents).toBeGreaterThanOrEqual(Math.max(...totals));
    const last = await planner.get(`/api/orders?sort=totalCents&dir=asc&pageSize=1&page=${up.body.total}`).expect(200);
    expect(last.body.items[0].total_cents).toBe(down.body.items[0].total_cents);
  });

  it('refuses bad paging, sorting and unknown parameters with 400 and a message per field', async () => {
    for (const [query, field] of [
      [`pageSize=${PAGE_SIZE_MAX + 1}`, 'pageSize'], ['pageSize=0', 'pageSize'], ['page=0', 'page'], ['page=abc', 'page'], ['page=1.5', 'page'],
      ['sort=password_hash', 'sort'], ['dir=sideways', 'dir'], ['q=' + 'x'.repeat(101), 'q'], ['page=1&page=2', 'page'],
    ] as const) {
      const res = await planner.get(`/api/orders?${query}`);
      expect(res.status, query).toBe(400);
      expect(res.body.error.fields[field], query).toBeTruthy();
    }
    const unknown = await planner.get('/api/orders?colour=red');
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.code).toBe('validation');
    for (const path of ['/api/batches?sort=units', '/api/shipping?state=delivered', '/api/shipments?delivered=maybe', '/api/bench?pageSize=500', '/api/users?role=king', '/api/parts?sort=password']) {
      const res = await (path.startsWith('/api/users') ? owner : planner).get(path);
      expect(res.status, path).toBe(400);
    }
  });

  it('filters and searches batches, people and the bench queue on the server', async () => {
    const closed = await planner.get('/api/batches?state=closed&pageSize=100').expect(200);
    expect(closed.body.items.every((b: { state: string }) => b.state === 'closed')).toBe(true);
    const all = await planner.get('/api/batches?pageSize=1').expect(200);
    expect(all.body.total).toBe(Math.min(COUNT_CAP, Number((await t.knex('batches').count('* as n').first())!.n)));
    const staff = await owner.get('/api/users?staff=true&sort=email&pageSize=100').expect(200);
    expect(staff.body.items.length).toBeGreaterThan(0);
    expect(staff.body.items.some((u: { role: string }) => u.role === 'customer')).toBe(false);
    const emails = staff.body.items.map((u: { email: string }) => u.email);
    expect(emails).toEqual([...emails].sort());
    const found = await owner.get('/api/users?q=whitlow').expect(200);
    expect(found.body.items.map((u: { email: string }) => u.email)).toEqual(['sam@mail.example']);
    const bench = await planner.get('/api/bench?pageSize=5').expect(200);
    expect(bench.body).toMatchObject({ page: 1, pageSize: 5 });
    expect(bench.body.total).toBe(Math.min(COUNT_CAP, Number((await t.knex('units').where({ state: 'built' }).count('* as n').first())!.n)));
  });
});

describe('shipping', () => {
  it('lists the orders on their way and, separately, recent shipments, each paged', async () => {
    const queue = await planner.get('/api/shipping?pageSize=5').expect(200);
    expect(queue.body.orders).toMatchObject({ page: 1, pageSize: 5 });
    const onTheWay = Number((await t.knex('orders').whereIn('state', ['scheduled', 'in_production', 'ready']).count('* as n').first())!.n);
    expect(queue.body.orders.total).toBe(onTheWay);
    const ready = await planner.get('/api/shipping?state=ready&pageSize=100').expect(200);
    expect(ready.body.orders.items.every((o: { state: string }) => o.state === 'ready')).toBe(true);

    // A shipped order and a delivered one, written directly: the list only reads them.
    const [shipped, delivered] = await t.knex('orders').whereNot('state', 'cancelled').orderBy('id', 'desc').limit(2).select('id');
    const before = Number((await t.knex('shipments').count('* as n').first())!.n);
    const [a] = await t.knex('shipments').insert({ order_id: shipped.id, carrier: 'Lanternpost', tracking_number: `LP-${process.pid}`, shipped_at: new Date() }).onConflict('order_id').ignore().returning('id');
    const [b] = await t.knex('shipments').insert({ order_id: delivered.id, carrier: 'Lanternpost', tracking_number: `LP-D-${process.pid}`, shipped_at: new Date(Date.now() - 86_400_000), delivered_at: new Date() }).onConflict('order_id').ignore().returning('id');
    try {
      const recent = await planner.get('/api/shipments?pageSize=100').expect(200);
      expect(recent.body.total).toBe(before + [a, b].filter(Boolean).length);
      const times = recent.body.items.map((s: { shippedAt: string }) => Date.parse(s.shippedAt));
      expect(times).toEqual([...times].sort((x, y) => y - x));
      const waiting = await planner.get('/api/shipments?delivered=false&pageSize=100').expect(200);
      expect(waiting.body.items.every((s: { deliveredAt: string | null }) => s.deliveredAt === null)).toBe(true);
      if (a) expect(ids(waiting.body)).toContain(a.id);
      if (b) expect(ids(waiting.body)).not.toContain(b.id);
    } finally {
      await t.knex('shipments').whereIn('id', [a?.id, b?.id].filter(Boolean)).del();
    }
  });
});
