// Printed labels: the parcel's address label (4 × 6 in, or A6) with a Code 128 barcode of the
// order number, and a sheet of small serial labels for a batch's units, each with the serial and
// a QR code of the unit's /verify link. Codes come from server/pdf/codes.ts (qrcode, bwip-js).
import PDFDocument from 'pdfkit';
import { code128Png, drawQr } from './codes';
import { registerFonts } from './fonts';
import { countryName as sharedCountryName } from '../../shared/format';

const MM = 72 / 25.4;

/** Page sizes of the address label, in points (4 × 6 in thermal labels; A6 = 105 × 148 mm, ISO 216). */
export const ADDRESS_LABEL_SIZES = {
  '4x6': { width: 4 * 72, height: 6 * 72, name: '4 × 6 in' },
  a6: { width: 105 * MM, height: 148 * MM, name: 'A6' },
} as const;
export type AddressLabelSize = keyof typeof ADDRESS_LABEL_SIZES;

export interface AddressLabelInput {
  size: AddressLabelSize;
  shop: { name: string; address: string };
  order: { number: string; ship_name: string; ship_line1: string; ship_line2: string; ship_city: string; ship_postcode: string; ship_country: string; ship_phone?: string };
  units: number;
  /** Once shipped: the carrier and its tracking number. */
  shipment: { carrier: string; tracking_number: string } | null;
}

function pdfBuffer(doc: PDFKit.PDFDocument): Promise<Buffer> {
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  return new Promise((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
}

/** A country code as its English name (DE → Germany); the code itself when unknown. */
const countryName = (code: string) => sharedCountryName(code.toUpperCase(), 'en');

/** Where the address label's barcode sits (points from the top left), for printing checks and tests. */
export function addressBarcodeBox(size: AddressLabelSize) {
  const { width, height } = ADDRESS_LABEL_SIZES[size];
  const margin = 14;
  return { x: margin, y: height - margin - 96, width: width - 2 * margin, height: 64 };
}

/** The address label: sender, recipient in large type, the order's barcode and number. One page. */
export async function renderAddressLabel(input: AddressLabelInput): Promise<Buffer> {
  const page = ADDRESS_LABEL_SIZES[input.size];
  const doc = new PDFDocument({ size: [page.width, page.height], margin: 0, info: { Title: `Address label ${input.order.number}`, Author: input.shop.name } });
  registerFonts(doc);
  const done = pdfBuffer(doc);
  const m = 14;
  const w = page.width - 2 * m;
  const o = input.order;

  doc.font('bold').fontSize(9).fillColor('#000').text(`From: ${input.shop.name}`, m, m, { width: w });
  doc.font('body').fontSize(8).text(input.shop.address, { width: w });
  const ruleY = doc.y + 6;
  doc.moveTo(m, ruleY).lineTo(page.width - m, ruleY).lineWidth(1.5).stroke('#000');

  doc.font('bold').fontSize(9).text('SHIP TO', m, ruleY + 10, { width: w });
  doc.font('bold').fontSize(18).text(o.ship_name, { width: w });
  doc.font('body').fontSize(14);
  for (const line of [o.ship_line1, o.ship_line2].filter(Boolean)) doc.text(line, { width: w });
  doc.font('bold').fontSize(16).text(`${o.ship_postcode} ${o.ship_city}`, { width: w });
  doc.font('bold').fontSize(16).text(countryName(o.ship_country).toUpperCase(), { width: w });
  if (o.ship_phone) doc.font('body').fontSize(10).text(`Phone ${o.ship_phone}`, { width: w });

  const box = addressBarcodeBox(input.size);
  if (input.shipment) {
    doc.font('body').fontSize(10).text(`${input.shipment.carrier} · tracking `, m, box.y - 34, { width: w, continued: true })
      .font('mono').text(input.shipment.tracking_number);
  }
  doc.font('body').fontSize(9).text(`Order ${o.number} · ${input.units} pedal${input.units === 1 ? '' : 's'}`, m, box.y - 18, { width: w });
  const png = await code128Png(o.number, 18, 4);
  doc.image(png, box.x, box.y, { fit: [box.width, box.height], align: 'center', valign: 'center' });
  doc.font('mono').fontSize(14).text(o.number, m, box.y + box.height + 6, { width: w, align: 'center' });
  doc.end();
  return done;
}

/**
 * Label sheets (sizes in mm): A4 holds 3 × 8 labels of 70 × 37 mm, Letter 3 × 10 of 66.7 × 25.4 mm
 * (the usual generic sheet layouts). Columns and rows touch; the page margins centre the grid.
 */
export const SERIAL_LABEL_SHEETS = {
  A4: { page: 'A4' as const, pageWidth: 210, pageHeight: 297, columns: 3, rows: 8, labelWidth: 70, labelHeight: 37, left: 0, top: 0.5, pitchX: 70, pitchY: 37 },
  Letter: { page: 'LETTER' as const, pageWidth: 215.9, pageHeight: 279.4, columns: 3, rows: 10, labelWidth: 66.7, labelHeight: 25.4, left: 4.8, top: 12.7, pitchX: 69.85, pitchY: 25.4 },
};
export type LabelPaper = keyof typeof SERIAL_LABEL_SHEETS;

export interface SerialLabelInput {
  paper: LabelPaper;
  shopName: string;
  units: { serial: string; model: string; option: string; verifyUrl: string }[];
}

/** Where label `index` (0-based, across pages) sits: its page and its box in mm from the page's top left. */
export function serialLabelBox(paper: LabelPaper, index: number) {
  const s = SERIAL_LABEL_SHEETS[paper];
  const perPage = s.columns * s.rows;
  const at = index % perPage;
  const col = at % s.columns;
  const row = Math.floor(at / s.columns);
  const x = s.left + col * s.pitchX;
  const y = s.top + row * s.pitchY;
  // 3 mm of white around the QR code on the label (its quiet zone).
  const pad = 3;
  const qr = s.labelHeight - 2 * pad;
  return { page: Math.floor(index / perPage), x, y, width: s.labelWidth, height: s.labelHeight, qr: { x: x + pad, y: y + pad, size: qr } };
}

/** A sheet (or sheets) of serial labels, one per unit, in the order given. */
export async function renderSerialLabels(input: SerialLabelInput): Promise<Buffer> {
  const sheet = SERIAL_LABEL_SHEETS[input.paper];
  const doc = new PDFDocument({ size: sheet.page, margin: 0, autoFirstPage: false, info: { Title: 'Serial labels', Author: input.shopName } });
  registerFonts(doc);
  const done = pdfBuffer(doc);
  input.units.forEach((unit, i) => {
    const box = serialLabelBox(input.paper, i);
    if (i % (sheet.columns * sheet.rows) === 0) doc.addPage({ size: sheet.page, margin: 0 });
    drawQr(doc, unit.verifyUrl, box.qr.x * MM, box.qr.y * MM, box.qr.size * MM, '#000');
    const tx = (box.qr.x + box.qr.size + 2.5) * MM;
    const tw = (box.x + box.width - 2.5) * MM - tx;
    const ty = (box.y + 3.5) * MM;
    doc.font('bold').fontSize(sheet.labelHeight > 30 ? 10 : 8.5).fillColor('#000').text(unit.serial, tx, ty, { width: tw, lineBreak: false });
    doc.font('body').fontSize(7.5).text(unit.model, { width: tw, height: 9, ellipsis: true });
    doc.font('body').fontSize(6.5).text(unit.option, { width: tw, height: 8, ellipsis: true });
    doc.font('body').fontSize(6).fillColor('#333').text(`${input.shopName} · scan to verify`, tx, (box.y + box.height - 3.5) * MM - 7, { width: tw, lineBreak: false, ellipsis: true });
  });
  if (input.units.length === 0) doc.addPage({ size: sheet.page, margin: 0 });
  doc.end();
  return done;
}
