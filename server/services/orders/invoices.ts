import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import { PLANNING } from '../../../shared/roles';
import { compute } from '../../compute/pool';
import { notFound } from '../../errors';
import type { InvoiceDocument, InvoiceLine } from '../../pdf/invoice';
import { getSettings } from '../settings';

// Invoices and credit notes. Each kind is one gap-free series: the number is taken from the
// kind's document_counters row (UPDATE … RETURNING, which holds the row lock until commit) in the
// transaction that issues the document. Two issuers queue on that row; a rollback returns the
// number with everything else, so no number is ever skipped or used twice. The PDF is rendered in
// the compute pool inside the same transaction, so an issued document always has its file.

export type DocumentKind = 'invoice' | 'credit-note';
const PREFIX: Record<DocumentKind, string> = { invoice: 'INV', 'credit-note': 'CN' };
export const documentNumber = (kind: DocumentKind, sequence: number) => `${PREFIX[kind]}-${String(sequence).padStart(6, '0')}`;

export interface IssuedDocument {
  id: number;
  kind: DocumentKind;
  number: string;
  filename: string;
}

/** Takes the next number of a series; call only inside the issuing transaction. */
export async function nextDocumentNumber(trx: Knex.Transaction, kind: DocumentKind): Promise<number> {
  const { rows } = await trx.raw<{ rows: { n: number }[] }>('UPDATE document_counters SET next_number = next_number + 1 WHERE kind = ? RETURNING next_number - 1 AS n', [kind]);
  if (!rows[0]) throw new Error(`The ${kind} counter row is missing: run the migrations.`);
  return rows[0].n;
}

const filenameOf = (kind: DocumentKind, number: string) => `${kind === 'invoice' ? 'invoice' : 'credit-note'}-${number}.pdf`;

async function renderAndStore(trx: Knex.Transaction, row: InvoiceRow, orderNumber: string, refersTo: string | null): Promise<number> {
  const settings = await getSettings(trx);
  const logo = settings.logo_file_id ? await trx('files').where({ id: settings.logo_file_id }).first('data') : null;
  const doc: InvoiceDocument = {
    kind: row.kind, number: row.number, issuedAt: new Date(row.issued_at).toISOString(), orderNumber, refersToNumber: refersTo,
    seller: row.seller, buyer: row.buyer, currency: row.currency, locale: settings.locale, timeZone: settings.time_zone, paperSize: settings.paper_size,
    lines: row.lines, netCents: row.net_cents, taxCents: row.tax_cents, totalCents: row.total_cents, taxRateBasisPoints: row.tax_rate_basis_points,
    taxNote: row.tax_note, logo: logo ? new Uint8Array(logo.data as Buffer) : null,
  };
  const pdf = await compute.invoicePdf(doc);
  const filename = filenameOf(row.kind, row.number);
  const [file] = await trx('files').insert({ purpose: row.kind, filename, content_type: 'application/pdf', size_bytes: pdf.length, data: pdf }).returning('id');
  await trx('invoices').where({ id: row.id }).update({ file_id: file.id });
  return file.id as number;
}

interface InvoiceRow {
  id: number;
  kind: DocumentKind;
  sequence: number;
  number: string;
  order_id: number;
  refers_to_invoice_id: number | null;
  issued_at: Date;
  currency: string;
  net_cents: number;
  tax_cents: number;
  total_cents: number;
  tax_rate_basis_points: number;
  tax_regime: string;
  tax_note: string;
  seller: InvoiceDocument['seller'];
  buyer: InvoiceDocument['buyer'];
  lines: InvoiceLine[];
  file_id: number | null;
}

/**
 * Issues the order's invoice (once: a second call returns the first) in the caller's transaction,
 * from what the order stored when it was placed: lines, shipping, rate and note, the shop's
 * identity now. Called when the payment is recorded.
 */
export async function issueInvoice(trx: Knex.Transaction, orderId: number): Promise<IssuedDocument> {
  const sourceKey = `order:${orderId}`;
  const existing = await trx('invoices').where({ kind: 'invoice', source_key: sourceKey }).first();
  if (existing) return issued(existing);
  const order = await trx('orders').where({ id: orderId }).first();
  if (!order) throw notFound('No such order');
  const settings = await getSettings(trx);
  const orderLines = await trx('order_lines').where({ order_id: orderId }).orderBy('id');
  const rate = order.tax_rate_basis_points ?? 0;
  const lines: InvoiceLine[] = orderLines.map((l) => ({
    description: l.description, quantity: l.quantity, netCents: l.net_cents ?? l.line_total_cents, taxRateBasisPoints: l.tax_rate_basis_points ?? rate,
    taxCents: l.tax_cents ?? 0, totalCents: l.line_total_cents,
  }));
  if (order.shipping_cents > 0) {
    lines.push({ description: 'Shipping', quantity: 1, netCents: order.shipping_cents - order.shipping_tax_cents, taxRateBasisPoints: rate, taxCents: order.shipping_tax_cents, totalCents: order.shipping_cents });
  }
  const sequence = await nextDocumentNumber(trx, 'invoice');
  const [row] = await trx('invoices').insert({
    kind: 'invoice', sequence, number: documentNumber('invoice', sequence), order_id: orderId, source_key: sourceKey, currency: order.currency,
    net_cents: lines.reduce((s, l) => s + l.netCents, 0), tax_cents: lines.reduce((s, l) => s + l.taxCents, 0), total_cents: order.total_cents,
    tax_rate_basis_points: rate, tax_regime: order.tax_regime ?? 'domestic', tax_note: order.tax_note ?? '',
    seller: JSON.stringify({ name: settings.shop_name, address: settings.shop_address, vatId: settings.vat_id, email: settings.shop_email, publicUrl: settings.public_url }),
    buyer: JSON.stringify({ name: order.ship_name, address: [order.ship_line1, order.ship_line2, `${order.ship_postcode} ${order.ship_city}`, order.ship_country].filter(Boolean) }),
    lines: JSON.stringify(lines),
  }).returning('*');
  return issued(row);
}

const issued = (row: { id: number; kind: DocumentKind; number: string }): IssuedDocument =>
  ({ id: row.id, kind: row.kind, number: row.number, filename: filenameOf(row.kind, row.number) });

/** The document's PDF file id, rendering and storing it first when it has none (under the row's lock, so once). */
export async function documentFile(knex: Knex, id: number): Promise<number> {
  return knex.transaction(async (trx) => {
    const row = await trx('invoices').where({ id }).forUpdate().first() as InvoiceRow | undefined;
    if (!row) throw notFound('No such document');
    if (row.file_id) return row.file_id;
    const order = await trx('orders').where({ id: row.order_id }).first('number');
    const refersTo = row.refers_to_invoice_id ? (await trx('invoices').where({ id: row.refers_to_invoice_id }).first('number')).number as string : null;
    return renderAndStore(trx, row, order.number, refersTo);
  });
}

/**
 * Issues a credit note for the order's invoice in full (once per refund key) in the caller's
 * transaction; an order paid before invoices existed gets its invoice first, so the note refers to one.
 */
export async function issueCreditNote(trx: Knex.Transaction, orderId: number, refundKey: string): Promise<IssuedDocument> {
  const sourceKey = `refund:${refundKey}`;
  const existing = await trx('invoices').where({ kind: 'credit-note', source_key: sourceKey }).first();
  if (existing) return issued(existing);
  const invoice = await issueInvoice(trx, orderId);
  const original = await trx('invoices').where({ id: invoice.id }).first() as InvoiceRow;
  const sequence = await nextDocumentNumber(trx, 'credit-note');
  const [row] = await trx('invoices').insert({
    kind: 'credit-note', sequence, number: documentNumber('credit-note', sequence), order_id: orderId, refers_to_invoice_id: original.id, source_key: sourceKey,
    currency: original.currency, net_cents: original.net_cents, tax_cents: original.tax_cents, total_cents: original.total_cents,
    tax_rate_basis_points: original.tax_rate_basis_points, tax_regime: original.tax_regime, tax_note: original.tax_note,
    seller: JSON.stringify(original.seller), buyer: JSON.stringify(original.buyer), lines: JSON.stringify(original.lines),
  }).returning('*');
  return issued(row);
}

/** The order's invoices and credit notes, for its page. */
export async function documentsOf(db: Knex | Knex.Transaction, orderId: number) {
  const rows = await db('invoices').where({ order_id: orderId }).orderBy('id').select('id', 'kind', 'number', 'issued_at', 'total_cents');
  return rows.map((r) => ({ id: r.id, kind: r.kind as DocumentKind, number: r.number, issuedAt: r.issued_at, totalCents: r.total_cents, url: `/api/invoices/${r.id}/pdf` }));
}

/** A document's PDF for its order's customer or order staff; anyone else gets 404, as for the order. */
export async function documentPdf(db: Knex, user: SessionUser, id: number) {
  const row = await db('invoices as i').join('orders as o', 'o.id', 'i.order_id').where('i.id', id).first('o.customer_id');
  const staff = (PLANNING as readonly string[]).includes(user.role);
  if (!row || (!staff && row.customer_id !== user.id)) throw notFound('No such document');
  const file = await db('files').where({ id: await documentFile(db, id) }).first('filename', 'data');
  return { filename: file.filename as string, data: file.data as Buffer };
}
