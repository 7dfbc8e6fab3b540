import PDFDocument from 'pdfkit';
import path from 'node:path';
import { createRequire } from 'node:module';
import { shopFormatter } from '../services/format';
import type { ShopSettings } from '../services/settings';

// Fonts ship with the app (npm font packages): nothing is fetched at run time.
const require = createRequire(import.meta.url);
const sansDir = path.join(path.dirname(require.resolve('source-sans/package.json')), 'TTF');
const FONTS = {
  regular: path.join(sansDir, 'SourceSans3-Regular.ttf'),
  bold: path.join(sansDir, 'SourceSans3-Bold.ttf'),
  mono: path.join(path.dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf', 'DejaVuSansMono.ttf'),
};

export interface SlipInput {
  settings: ShopSettings;
  order: { number: string; ship_name: string; ship_line1: string; ship_line2: string; ship_city: string; ship_postcode: string; ship_country: string };
  /** Null while the order is ready but not shipped yet (the slip is printed for packing). */
  shipment: { carrier: string; tracking_number: string; shipped_at: Date | string } | null;
  units: { serial: string; model_name: string; option_name: string; supply_v: number }[];
}

/** The packing slip that goes in the box: who it is for, what is inside (by serial), and the power note. */
export function renderPackingSlip({ settings, order, shipment, units }: SlipInput): Promise<Buffer> {
  const doc = new PDFDocument({ size: settings.paper_size === 'Letter' ? 'LETTER' : 'A4', margin: 56, info: { Title: `Packing slip ${order.number}`, Author: settings.shop_name } });
  doc.registerFont('regular', FONTS.regular);
  doc.registerFont('bold', FONTS.bold);
  doc.registerFont('mono', FONTS.mono);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));

  const day = (d: Date | string) => shopFormatter(settings).date(new Date(d));
  doc.font('bold').fontSize(20).fillColor('#1f4d43').text(settings.shop_name);
  doc.font('regular').fontSize(9).fillColor('#444').text(settings.shop_address);
  doc.moveDown(1.5);
  doc.font('bold').fontSize(16).fillColor('#111').text(`Packing slip · order ${order.number}`);
  if (shipment) doc.font('regular').fontSize(11).text(`Shipped ${day(shipment.shipped_at)} with ${shipment.carrier}, tracking `, { continued: true }).font('mono').text(shipment.tracking_number);
  else doc.font('regular').fontSize(11).text(`Packed ${day(new Date())}. The shipping mail brings the carrier and the tracking number.`);
  doc.moveDown();
  doc.font('bold').text('Ship to');
  doc.font('regular').text([order.ship_name, order.ship_line1, order.ship_line2, `${order.ship_postcode} ${order.ship_city}`, order.ship_country].filter(Boolean).join('\n'));
  doc.moveDown();
  doc.font('bold').text(`In this box (${units.length} pedal${units.length === 1 ? '' : 's'})`);
  doc.moveDown(0.3);
  for (const u of units) {
    doc.font('mono').fontSize(10).text(u.serial, { continued: true }).font('regular').fontSize(11).text(`   ${u.model_name} — ${u.option_name} · ${u.supply_v} V DC, centre negative`);
  }
  doc.moveDown();
  doc.font('regular').fontSize(9).fillColor('#444').text(
    'Power: use a regulated supply of the stated voltage, centre-negative barrel plug. No batteries are packed; '
    + 'power supplies follow the destination country’s rules. Each pedal’s spec sheet, with its own measured profile, is in its box and online under its serial number.',
  );
  doc.end();
  return done;
}
