// Invoices on payment and credit notes on refund: numbered without gaps, with the rate per line.
import { PDFParse } from 'pdf-parse';
import { beforeAll, describe, expect, it } from 'vitest';
import { issueInvoice } from '../../server/services/orders/invoices';
import { DEMO, signedInAgent, type TestAgent } from '../support/app';
import { ADDRESS, insertPedal, placeOrder, type PedalFixture } from './orders-fixtures';
import { eventually, payWith, usePaymentsApp } from './payments-setup';

const env = usePaymentsApp();
let pedal: PedalFixture;
let customer: TestAgent;
let other: TestAgent;
let planner: TestAgent;

beforeAll(async () => {
  pedal = await insertPedal(env.t.knex);
  customer = await signedInAgent(env.t.app, DEMO.customer);
  other = await signedInAgent(env.t.app, 'sam@mail.example');
  planner = await signedInAgent(env.t.app, DEMO.planner);
});

async function pdfText(pdf: Buffer) {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  const result = await parser.getText();
  await parser.destroy();
  return result.text;
}

async function paidOrder(shipping: Partial<typeof ADDRESS> = {}) {
  const res = await customer.post('/api/orders').set('X-CSRF-Token', customer.csrf)
    .send({ lines: [{ modelId: pedal.modelId, optionId: pedal.options.led, quantity: 1 }], shipping: { ...ADDRESS, ...shipping } }).expect(201);
  const order = res.body.order;
  const checkout = await customer.post(`/api/orders/${order.id}/checkout`).set('X-CSRF-Token', customer.csrf).send({}).expect(200);
  await payWith(env.fake, (checkout.body.url as string).split('/pay/')[1], 'succeeds');
  const invoice = await eventually(() => env.t.knex('invoices').where({ order_id: order.id, kind: 'invoice' }).first(), `the invoice of order ${order.number}`, 30_000);
  return { order, invoice };
}

const pdfOf = async (agent: TestAgent, id: number) => (await agent.get(`/api/invoices/${id}/pdf`).buffer(true).parse((res, cb) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
}).expect(200)).body as Buffer;

describe('invoices', () => {
  it('issues a numbered invoice PDF on payment, with rate per line and the VAT id, attached to the receipt', async () => {
    const { order, invoice } = await paidOrder();
    expect(invoice.number).toMatch(/^INV-\d{6}$/);
    const mail = await env.t.knex('outbox').where({ dedupe_key: `order-received:${order.id}` }).first();
    expect(mail.attachments).toEqual([{ filename: `invoice-${invoice.number}.pdf`, invoiceId: invoice.id }]);
    expect(mail.data).toMatchObject({ invoiceNumber: invoice.number, taxRate: '19 %' });
    const text = await pdfText(await pdfOf(customer, invoice.id));
    const settings = await env.t.knex('settings').where({ id: 1 }).first();
    expect(text).toContain(`Invoice ${invoice.number}`);
    expect(text).toContain(order.number);
    expect(text).toContain(settings.shop_name);
    expect(text).toContain(`VAT id ${settings.vat_id}`);
    expect(text).toMatch(/19 %/);
    expect(text).toContain('Shipping');
    // The order page lists it; the customer and order staff may open it, another customer may not.
    const detail = await customer.get(`/api/orders/${order.id}`).expect(200);
    expect(detail.body.documents).toMatchObject([{ kind: 'invoice', number: invoice.number, url: `/api/invoices/${invoice.id}/pdf` }]);
    await planner.get(`/api/invoices/${invoice.id}/pdf`).expect(200);
    // Rendered once, on first use, and kept.
    expect((await env.t.knex('invoices').where({ id: invoice.id }).first()).file_id).not.toBeNull();
    await other.get(`/api/invoices/${invoice.id}/pdf`).expect(404);
  });

  it('zero-rates an export invoice and prints the note', async () => {
    const { invoice } = await paidOrder({ country: 'CH', postcode: '8001', city: 'Zürich' });
    expect(invoice).toMatchObject({ tax_rate_basis_points: 0, tax_cents: 0, tax_regime: 'export' });
    const text = await pdfText(await pdfOf(customer, invoice.id));
    expect(text).toContain('Export outside the EU: zero-rated');
  });

  it('numbers invoices one after another without gaps, also when an issuing transaction rolls back', async () => {
    const first = await paidOrder();
    // A payment transaction that numbers an invoice and then fails gives the number back.
    const order = await placeOrder(customer, pedal);
    await expect(env.t.knex.transaction(async (trx) => {
      await issueInvoice(trx, order.order.id);
      throw new Error('payment transaction failed after the invoice was numbered');
    })).rejects.toThrow(/payment transaction failed/);
    expect(await env.t.knex('invoices').where({ order_id: order.order.id })).toHaveLength(0);
    expect((await env.t.knex('document_counters').where({ kind: 'invoice' }).first()).next_number).toBe(first.invoice.sequence + 1);
    const second = await paidOrder();
    expect(second.invoice.sequence).toBe(first.invoice.sequence + 1);
    // Eight orders issued at once still take consecutive numbers, each once.
    const orders = await Promise.all(Array.from({ length: 8 }, () => placeOrder(customer, pedal)));
    const issued = await Promise.all(orders.map(({ order: o }) => env.t.knex.transaction((trx) => issueInvoice(trx, o.id))));
    const sequences = (await env.t.knex('invoices').whereIn('id', issued.map((i) => i.id)).pluck('sequence')).sort((a, b) => a - b);
    expect(sequences).toEqual(Array.from({ length: 8 }, (_, i) => second.invoice.sequence + 1 + i));
    // And the whole series, from the first invoice this database issued, has no hole.
    const all = (await env.t.knex('invoices').where({ kind: 'invoice' }).orderBy('sequence').pluck('sequence')) as number[];
    expect(all).toEqual(Array.from({ length: all.length }, (_, i) => all[0] + i));
    // Issuing again for the same order returns the same invoice.
    const again = await env.t.knex.transaction((trx) => issueInvoice(trx, orders[0].order.id));
    expect(again.number).toBe(issued[0].number);
  });
});

describe('credit notes', () => {
  it('issues a numbered credit note for a refund, referring to the invoice, attached to the refund mail', async () => {
    const { order, invoice } = await paidOrder();
    await customer.post(`/api/orders/${order.id}/cancel`).set('X-CSRF-Token', customer.csrf).send({ reason: 'Changed my mind' }).expect(200);
    const note = await eventually(() => env.t.knex('invoices').where({ order_id: order.id, kind: 'credit-note' }).first(), 'the credit note');
    expect(note).toMatchObject({ refers_to_invoice_id: invoice.id, total_cents: invoice.total_cents, tax_cents: invoice.tax_cents });
    expect(note.number).toMatch(/^CN-\d{6}$/);
    const mail = await env.t.knex('outbox').where({ dedupe_key: `order-refunded:${order.id}` }).first();
    expect(mail.attachments).toEqual([{ filename: `credit-note-${note.number}.pdf`, invoiceId: note.id }]);
    expect(mail.data.creditNoteNumber).toBe(note.number);
    const text = await pdfText(await pdfOf(customer, note.id));
    expect(text).toContain(`Credit note ${note.number}`);
    expect(text).toContain(`Credits invoice ${invoice.number} in full`);
    expect(text).toContain('Total credited');
    // Credit notes are their own gap-free series.
    const notes = (await env.t.knex('invoices').where({ kind: 'credit-note' }).orderBy('sequence').pluck('sequence')) as number[];
    expect(notes).toEqual(Array.from({ length: notes.length }, (_, i) => notes[0] + i));
  });
});
