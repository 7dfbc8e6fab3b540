import PDFDocument from 'pdfkit';
import { registerFonts } from './fonts';
import { createFormatter } from '../../shared/format';

// An invoice or a credit note, drawn from the snapshot stored on its `invoices` row (what was
// sold, to whom, by whom, at which rate), so the same document renders the same PDF later.

export interface InvoiceLine {
  description: string;
  quantity: number;
  netCents: number;
  taxRateBasisPoints: number;
  taxCents: number;
  totalCents: number;
}

export interface InvoiceDocument {
  kind: 'invoice' | 'credit-note';
  number: string;
  issuedAt: string;
  orderNumber: string;
  refersToNumber: string | null;
  seller: { name: string; address: string; vatId: string; email: string; publicUrl: string };
  buyer: { name: string; address: string[] };
  currency: string;
  locale: string;
  timeZone: string;
  paperSize: 'A4' | 'Letter';
  lines: InvoiceLine[];
  netCents: number;
  taxCents: number;
  totalCents: number;
  taxRateBasisPoints: number;
  taxNote: string;
  /** The shop's logo (PNG or JPEG bytes), when it has one. */
  logo: Uint8Array | null;
}


export function renderInvoice(d: InvoiceDocument): Promise<Buffer> {
  const credit = d.kind === 'credit-note';
  const title = credit ? 'Credit note' : 'Invoice';
  const doc = new PDFDocument({ size: d.paperSize === 'Letter' ? 'LETTER' : 'A4', margin: 56, info: { Title: `${title} ${d.number}`, Author: d.seller.name } });
  registerFonts(doc);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
  const f = createFormatter({ locale: d.locale, timeZone: d.timeZone, currency: d.currency });
  const money = (cents: number) => f.money((credit ? -1 : 1) * cents);
  const date = f.date(d.issuedAt);
  const percent = (basisPoints: number) => `${f.significant(basisPoints / 100, 4)} %`;
  const left = doc.page.margins.left;
  const width = doc.page.width - left - doc.page.margins.right;

  // Seller
  const top = doc.y;
  if (d.logo) {
    try {
      doc.image(Buffer.from(d.logo.buffer, d.logo.byteOffset, d.logo.byteLength), left + width - 120, top, { fit: [120, 60], align: 'right' });
    } catch {
      // A logo pdfkit cannot read is left out rather than failing the document.
    }
  }
  doc.font('bold').fontSize(18).fillColor('#1f4d43').text(d.seller.name, left, top, { width: width - 130 });
  doc.font('body').fontSize(9).fillColor('#444')
    .text([d.seller.address, d.seller.email, d.seller.publicUrl].filter(Boolean).join(' · '), { width: width - 130 });
  if (d.seller.vatId) doc.text(`VAT id ${d.seller.vatId}`);
  doc.moveDown(2);

  // Title block and buyer
  doc.font('bold').fontSize(16).fillColor('#111').text(`${title} ${d.number}`, left);
  doc.font('body').fontSize(10.5).fillColor('#111')
    .text(`Date of issue: ${date}`)
    .text(`Order: ${d.orderNumber}`);
  if (d.refersToNumber) doc.text(`Credits invoice ${d.refersToNumber} in full.`);
  doc.moveDown(0.8);
  doc.font('bold').text(credit ? 'Credited to' : 'Billed to');
  doc.font('body').text([d.buyer.name, ...d.buyer.address].filter(Boolean).join('\n'));
  doc.moveDown(1.2);

  // Lines: description, quantity, net, rate, VAT, total
  const cols = [
    { label: 'Item', w: width - 300, align: 'left' as const },
    { label: 'Qty', w: 35, align: 'right' as const },
    { label: 'Net', w: 70, align: 'right' as const },
    { label: 'VAT rate', w: 55, align: 'right' as const },
    { label: 'VAT', w: 65, align: 'right' as const },
    { label: 'Total', w: 75, align: 'right' as const },
  ];
  const row = (cells: string[], font: 'body' | 'bold') => {
    const y = doc.y;
    let x = left;
    let bottom = y;
    doc.font(font).fontSize(10);
    cells.forEach((cell, i) => {
      doc.text(cell, x, y, { width: cols[i].w - 4, align: cols[i].align });
      bottom = Math.max(bottom, doc.y);
      x += cols[i].w;
    });
    doc.y = bottom + 4;
    doc.x = left;
  };
  row(cols.map((c) => c.label), 'bold');
  doc.moveTo(left, doc.y - 2).lineTo(left + width, doc.y - 2).strokeColor('#1f4d43').lineWidth(0.8).stroke();
  for (const l of d.lines) {
    row([l.description, String(l.quantity), money(l.netCents), percent(l.taxRateBasisPoints), money(l.taxCents), money(l.totalCents)], 'body');
  }
  doc.moveTo(left, doc.y).lineTo(left + width, doc.y).strokeColor('#999').lineWidth(0.5).stroke();
  doc.moveDown(0.5);
  const total = (label: string, value: string, font: 'body' | 'bold' = 'body') => {
    const y = doc.y;
    doc.font(font).fontSize(11).text(label, left, y, { width: width - 110, align: 'right' });
    doc.text(value, left + width - 105, y, { width: 105, align: 'right' });
  };
  total('Net amount', money(d.netCents));
  total(`VAT at ${percent(d.taxRateBasisPoints)}`, money(d.taxCents));
  total(credit ? 'Total credited' : 'Total paid', money(d.totalCents), 'bold');
  doc.moveDown(1.5);
  doc.x = left;
  if (d.taxNote) doc.font('body').fontSize(10).fillColor('#111').text(d.taxNote, { width });
  if (!credit) doc.font('body').fontSize(9).fillColor('#444').text('Paid in full by card at the time of ordering.', { width });
  doc.end();
  return done;
}
