// Printing at the packing bench: the packing slip once an order is ready, the address label with
// its order-number barcode, and a batch's serial labels whose QR codes lead to /verify. Every code
// is read back from the rendered PDF page by a real decoder (tests/support/barcodes.ts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addressBarcodeBox, serialLabelBox } from '../../server/pdf/labels';
import { verifyUrl } from '../../server/services/spec-sheets/assemble';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { decode, pageSizePoints, pdfText, renderPage } from '../support/barcodes';
import { fetchBinary, insertBatch, insertOrder, demoOption, userId } from './spec-sheets-setup';

const t = startTestApp();
let planner: TestAgent;
let ready: { orderId: number; number: string; serials: string[]; batchId: number };
let waiting: { orderId: number; number: string };

async function orderWithPassedUnits(units: number) {
  const option = await demoOption(t.knex);
  const customer = await userId(t.knex, DEMO.customer);
  const { orderId, orderLineId } = await insertOrder(t.knex, customer, option.optionId, units);
  const batch = await insertBatch(t.knex, Array.from({ length: units }, () => ({ vf: [0.62, 1.81], state: 'passed' as const })), { orderId, orderLineId });
  await t.knex('orders').where({ id: orderId }).update({ state: 'ready', ship_name: 'Ines Falk', ship_line1: 'Kiefernweg 4', ship_city: 'Lüneburg', ship_postcode: '21335', ship_country: 'DE' });
  const { number } = await t.knex('orders').where({ id: orderId }).first('number');
  return { orderId, number: number as string, serials: batch.units.map((u) => u.serial), batchId: batch.batchId };
}

beforeAll(async () => {
  planner = await signedInAgent(t.app, DEMO.planner);
  ready = await orderWithPassedUnits(2);
  const option = await demoOption(t.knex);
  const customer = await userId(t.knex, DEMO.customer);
  const other = await insertOrder(t.knex, customer, option.optionId, 1); // in production: nothing passed yet
  waiting = { orderId: other.orderId, number: (await t.knex('orders').where({ id: other.orderId }).first('number')).number };
});
afterAll(() => t.stop());

describe('the address label', () => {
  it('is a 4 × 6 in page whose Code 128 barcode reads back as the order number', async () => {
    const { body, headers } = await fetchBinary(planner, `/api/orders/${ready.orderId}/address-label.pdf`);
    expect(headers['content-type']).toBe('application/pdf');
    // 4 × 6 in at 72 pt per inch (PDF user space, ISO 32000-1 §8.3.2.3).
    expect(pageSizePoints(body)).toMatchObject({ width: 288, height: 432, pages: 1 });
    const page = renderPage(body, 1, 300, 'test-results/address-label-4x6.png');
    expect(decode(page, 'CODE_128')).toBe(ready.number);
    const text = pdfText(body);
    for (const words of ['Ines Falk', 'Kiefernweg 4', '21335 Lüneburg', 'GERMANY', ready.number]) expect(text).toContain(words);
  });

  it('comes as A6 too, and its barcode reads back from the box the layout puts it in', async () => {
    const { body } = await fetchBinary(planner, `/api/orders/${ready.orderId}/address-label.pdf?size=a6`);
    const size = pageSizePoints(body);
    // A6 is 105 × 148 mm (ISO 216); 1 mm = 72 / 25.4 pt.
    expect(size.width).toBeCloseTo((105 * 72) / 25.4, 0);
    expect(size.height).toBeCloseTo((148 * 72) / 25.4, 0);
    const page = renderPage(body, 1, 300, 'test-results/address-label-a6.png');
    const box = addressBarcodeBox('a6');
    const mm = (pt: number) => (pt * 25.4) / 72;
    expect(decode(page, 'CODE_128', { x: mm(box.x), y: mm(box.y), width: mm(box.width), height: mm(box.height) })).toBe(ready.number);
  });

  it('refuses an unknown size with 400, an order not ready with 409, and a missing order with 404', async () => {
    const bad = await planner.get(`/api/orders/${ready.orderId}/address-label.pdf?size=a4`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.size).toBeTruthy();
    expect((await planner.get(`/api/orders/${ready.orderId}/address-label.pdf?colour=red`)).status).toBe(400);
    expect((await planner.get(`/api/orders/${waiting.orderId}/address-label.pdf`)).status).toBe(409);
    expect((await planner.get('/api/orders/2147483647/address-label.pdf')).status).toBe(404);
  });
});

describe('the packing slip', () => {
  it('prints as soon as the order is ready, before shipping, listing the serials; not before', async () => {
    const { body } = await fetchBinary(planner, `/api/orders/${ready.orderId}/packing-slip.pdf`);
    const text = pdfText(body);
    expect(text).toContain(`order ${ready.number}`);
    for (const serial of ready.serials) expect(text).toContain(serial);
    expect(text).toMatch(/Packed .* tracking number/);
    const early = await planner.get(`/api/orders/${waiting.orderId}/packing-slip.pdf`);
    expect(early.status).toBe(409);
    expect(early.body.error.message).toMatch(/not ready to pack/);
  });

  it('is the stored slip with carrier and tracking once the order has shipped', async () => {
    const order = await orderWithPassedUnits(1);
    const carrier = await t.knex('carriers').where({ active: true }).orderBy('position').first();
    await planner.post('/api/shipments').set('X-CSRF-Token', planner.csrf).send({ orderId: order.orderId, carrierId: carrier.id, trackingNumber: 'PW 5512 0091 33' }).expect(201);
    const text = pdfText((await fetchBinary(planner, `/api/orders/${order.orderId}/packing-slip.pdf`)).body);
    expect(text).toContain(`with ${carrier.name}, tracking`);
    expect(text).toContain('PW 5512 0091 33');
    // The address label now names the carrier and tracking too.
    expect(pdfText((await fetchBinary(planner, `/api/orders/${order.orderId}/address-label.pdf`)).body)).toContain('PW 5512 0091 33');
  });
});

describe('serial labels', () => {
  it('gives each unit of a batch a label with its serial and a QR code that reads back as its /verify link', async () => {
    const batch = await insertBatch(t.knex, Array.from({ length: 5 }, () => ({ vf: [0.62, 1.81] })));
    const { body } = await fetchBinary(planner, `/api/batches/${batch.batchId}/serial-labels.pdf`);
    const size = pageSizePoints(body);
    // The demo shop prints on A4: 210 × 297 mm (ISO 216).
    expect(size.width).toBeCloseTo((210 * 72) / 25.4, 0);
    expect(size.pages).toBe(1);
    const text = pdfText(body);
    const page = renderPage(body, 1, 300, 'test-results/serial-labels.png');
    const units = await t.knex('units').where({ batch_id: batch.batchId }).orderBy('sequence').select('serial', 'verify_code');
    expect(units).toHaveLength(5);
    for (const [i, unit] of units.entries()) {
      expect(text).toContain(unit.serial);
      const { qr } = serialLabelBox('A4', i);
      // The QR with a 2 mm quiet zone around it, as a scanner would frame it.
      const read = decode(page, 'QR_CODE', { x: qr.x - 2, y: qr.y - 2, width: qr.size + 4, height: qr.size + 4 });
      expect(read).toBe(verifyUrl(t.config.publicUrl, unit.serial, unit.verify_code));
      expect(read).toContain(`/verify/${unit.serial}?c=`);
    }
  });

  it('runs onto a second sheet past 24 labels, leaves cancelled units out, and is 404 for a missing batch', async () => {
    const batch = await insertBatch(t.knex, Array.from({ length: 26 }, () => ({ vf: [0.62, 1.81] })));
    await t.knex('units').where({ batch_id: batch.batchId, sequence: 26 }).update({ state: 'cancelled' });
    const { body } = await fetchBinary(planner, `/api/batches/${batch.batchId}/serial-labels.pdf`);
    expect(pageSizePoints(body).pages).toBe(2);
    const text = pdfText(body);
    expect(text).toContain(batch.units[24].serial);
    expect(text).not.toContain(batch.units[25].serial);
    // The second sheet holds one label, in the first place: its code is the 25th unit's. Read from
    // that label's QR box, as a scanner frames it (a whole A4 page at 300 dpi is a poor frame).
    const second = renderPage(body, 2, 300, 'test-results/serial-labels-second-sheet.png');
    const { qr } = serialLabelBox('A4', 0);
    expect(decode(second, 'QR_CODE', { x: qr.x - 2, y: qr.y - 2, width: qr.size + 4, height: qr.size + 4 })).toContain(batch.units[24].serial);
    expect((await planner.get('/api/batches/2147483647/serial-labels.pdf')).status).toBe(404);
  });
});
