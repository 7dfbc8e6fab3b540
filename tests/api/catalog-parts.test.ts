import { afterAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { DEMO, signedInAgent, startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());
const stamp = `${process.pid}${Date.now() % 100000}`;

async function newPart(agent: Awaited<ReturnType<typeof signedInAgent>>, suffix: string, extra: Record<string, unknown> = {}) {
  const res = await agent.post('/api/parts').set('X-CSRF-Token', agent.csrf)
    .send({ partNumber: `T-${stamp}-${suffix}`, category: 'resistor', value: '1kΩ', unitCostCents: 5, leadTimeDays: 3, reorderPoint: 10, ...extra });
  expect(res.status).toBe(201);
  return res.body.part as { id: number; partNumber: string; available: number };
}

describe('parts', () => {
  it('refuses bad input with a message per field', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const res = await planner.post('/api/parts').set('X-CSRF-Token', planner.csrf).send({ partNumber: 'bad number!', category: 'banana', unitCostCents: -1, leadTimeDays: 1.5, reorderPoint: 'x' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toMatchObject({
      partNumber: 'Letters, digits and . _ - / only', category: 'Choose a category', unitCostCents: 'Unit cost cannot be negative',
      leadTimeDays: 'Lead time must be a whole number', reorderPoint: 'Enter Reorder point as a number',
    });
    const dup = await planner.post('/api/parts').set('X-CSRF-Token', planner.csrf).send({ partNumber: 'R-10K-MF', category: 'resistor', unitCostCents: 1, leadTimeDays: 1, reorderPoint: 1 });
    expect(dup.status).toBe(400);
    expect(dup.body.error.fields.partNumber).toBe('R-10K-MF already exists');
  });

  it('lists with server-side search, filter, sort and pages, and flags low stock', async () => {
    const tester = await signedInAgent(t.app, DEMO.tester);
    const page1 = await tester.get('/api/parts?category=resistor&sort=partNumber&dir=desc&pageSize=5&page=1').expect(200);
    const page2 = await tester.get('/api/parts?category=resistor&sort=partNumber&dir=desc&pageSize=5&page=2').expect(200);
    expect(page1.body.items).toHaveLength(5);
    expect(page1.body.total).toBeGreaterThanOrEqual(18);
    const numbers = [...page1.body.items, ...page2.body.items].map((p: { partNumber: string }) => p.partNumber);
    expect(numbers).toEqual([...numbers].sort().reverse());
    expect(new Set(numbers).size).toBe(10);
    const low = await tester.get('/api/parts?lowStock=true&pageSize=100').expect(200);
    expect(low.body.items.length).toBeGreaterThan(0);
    for (const p of low.body.items) expect(p.available).toBeLessThan(p.reorderPoint);
    expect(low.body.items.map((p: { partNumber: string }) => p.partNumber)).toContain('D-GE-PC');
    const search = await tester.get('/api/parts?q=tl072').expect(200);
    expect(search.body.items.map((p: { partNumber: string }) => p.partNumber)).toEqual(['IC-TL072']);
    await tester.get('/api/parts?sort=password').expect(400);
    await tester.post('/api/parts').set('X-CSRF-Token', tester.csrf).send({}).expect(403);
  });

  it('derives stock from movements and refuses one that would take available below zero (409)', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const p = await newPart(planner, 'LEDGER');
    const post = (body: object) => planner.post(`/api/parts/${p.id}/movements`).set('X-CSRF-Token', planner.csrf).send(body);
    expect((await post({ kind: 'receive', quantity: 10, reason: 'delivery' })).body.stock).toEqual({ on_hand: 10, reserved: 0, available: 10 });
    expect((await post({ kind: 'reserve', quantity: 4, reason: 'batch' })).body.stock).toEqual({ on_hand: 10, reserved: 4, available: 6 });
    const over = await post({ kind: 'consume', quantity: 7, reason: 'oops' });
    expect(over.status).toBe(409);
    expect(over.body.error.message).toContain('6 available');
    expect((await post({ kind: 'release', quantity: 5, reason: 'too many' })).status).toBe(409);
    expect((await post({ kind: 'adjust', quantity: -2, reason: 'count' })).body.stock.available).toBe(4);
    const bad = await post({ kind: 'consume', quantity: -3, reason: '' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toMatchObject({ reason: 'Say why', quantity: 'Quantity must be positive (only an adjustment can be negative)' });
    const detail = await planner.get(`/api/parts/${p.id}`).expect(200);
    expect(detail.body.part).toMatchObject({ onHand: 8, reserved: 4, available: 4, lowStock: true });
    expect(detail.body.part.movements.map((m: { kind: string }) => m.kind)).toEqual(['adjust', 'reserve', 'receive']);
  });

  it('lets only one of two concurrent movements take the last stock', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const owner = await signedInAgent(t.app, DEMO.owner);
    const p = await newPart(planner, 'RACE');
    await planner.post(`/api/parts/${p.id}/movements`).set('X-CSRF-Token', planner.csrf).send({ kind: 'receive', quantity: 5, reason: 'delivery' }).expect(201);
    for (let round = 0; round < 3; round++) {
      const results = await Promise.all([planner, owner, planner, owner].map((a) =>
        a.post(`/api/parts/${p.id}/movements`).set('X-CSRF-Token', a.csrf).send({ kind: 'reserve', quantity: 2, reason: `race ${round}` })));
      const codes = results.map((r) => r.status).sort();
      if (round === 0) expect(codes).toEqual([201, 201, 409, 409]);
      else expect(codes).toEqual([409, 409, 409, 409]);
    }
    const stock = await t.knex('part_stock').where({ part_id: p.id }).first();
    expect(stock).toMatchObject({ on_hand: 5, reserved: 4, available: 1 });
  });

  it('receives a supplier delivery of several lines at once, all or nothing', async () => {
    const planner = await signedInAgent(t.app, DEMO.planner);
    const a = await newPart(planner, 'RCVA');
    const b = await newPart(planner, 'RCVB');
    const supplier = await t.knex('suppliers').first('id');
    const ok = await planner.post('/api/stock/receive').set('X-CSRF-Token', planner.csrf).send({ supplierId: supplier.id, reference: 'DN-TEST-1', lines: [{ partId: a.id, quantity: 30 }, { partId: b.id, quantity: 12 }] });
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({ received: 2, units: 42 });
    const bad = await planner.post('/api/stock/receive').set('X-CSRF-Token', planner.csrf).send({ supplierId: supplier.id, reference: 'DN-TEST-2', lines: [{ partId: a.id, quantity: 5 }, { partId: 99999999, quantity: 1 }] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields['lines.1.partId']).toBe('No such part');
    const stock = await t.knex('part_stock').whereIn('part_id', [a.id, b.id]).orderBy('part_id').pluck('on_hand');
    expect(stock).toEqual([30, 12]);
    const empty = await planner.post('/api/stock/receive').set('X-CSRF-Token', planner.csrf).send({ supplierId: supplier.id, reference: '', lines: [] });
    expect(empty.body.error.fields).toMatchObject({ reference: 'Enter the delivery note number', lines: 'Add at least one line' });
  });

  it('exports the parts list and a movement history as CSV', async () => {
    const assembler = await signedInAgent(t.app, DEMO.assembler);
    const res = await assembler.get('/api/parts/export.csv?category=led').expect(200);
    expect(res.headers['content-type']).toContain('text/csv');
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    expect(rows.length).toBe(await t.knex('parts').where({ category: 'led' }).count<{ c: number }[]>('* as c').then((r) => Number(r[0].c)));
    const red = rows.find((r) => r['part number'] === 'LED-RED-5')!;
    const stock = await t.knex('parts as p').join('part_stock as s', 's.part_id', 'p.id').where('p.part_number', 'LED-RED-5').first('s.available');
    expect(Number(red.available)).toBe(stock.available);
    expect(red['unit cost']).toBe('0.05');
    const part = await t.knex('parts').where({ part_number: 'D-1N4148' }).first('id');
    const hist = await assembler.get(`/api/stock/movements.csv?partId=${part.id}`).expect(200);
    const moves = parse(hist.text, { columns: true }) as Record<string, string>[];
    expect(moves.every((m) => m['part number'] === 'D-1N4148')).toBe(true);
    expect(moves.map((m) => m.kind)).toEqual(expect.arrayContaining(['receive', 'consume']));
  });
});
