// Vector charts drawn with pdfkit paths (no images), so they print sharply and stay small.
import { SPEC_SHEET_LAYOUT } from '../../templates/pdf/spec-sheet-layout';

type Doc = PDFKit.PDFDocument;
const C = SPEC_SHEET_LAYOUT.colours;

interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

function frame(doc: Doc, box: Box, title: string) {
  doc.font('semibold').fontSize(8).fillColor(C.ink).text(title, box.x, box.y - 12, { width: box.width, lineBreak: false });
  doc.lineWidth(0.5).strokeColor(C.rule).rect(box.x, box.y, box.width, box.height).stroke();
}

/**
 * Bars of H2…Hk in dBc from 0 dB down to `floorDb`, labelled with their order; `measuredDbc` (H1…Hk
 * from a bench capture) is overlaid as an outline over each predicted bar.
 */
export function spectrumBars(doc: Doc, box: Box, harmonicsDbc: number[], title: string, floorDb = -80, measuredDbc: number[] | null = null) {
  frame(doc, box, title);
  const orders = harmonicsDbc.slice(1);
  const slot = box.width / orders.length;
  const yOf = (db: number) => box.y + (Math.min(0, Math.max(floorDb, db)) / floorDb) * box.height;
  doc.font('body').fontSize(6).fillColor(C.soft);
  for (const db of [0, -20, -40, -60, -80].filter((d) => d >= floorDb)) {
    doc.lineWidth(0.3).strokeColor(C.rule).moveTo(box.x, yOf(db)).lineTo(box.x + box.width, yOf(db)).stroke();
    doc.text(`${db}`, box.x - 16, yOf(db) - 3, { width: 14, align: 'right', lineBreak: false });
  }
  orders.forEach((db, i) => {
    const order = i + 2;
    const x = box.x + i * slot + slot * 0.2;
    // Bars grow up from the floor: taller = stronger harmonic (0 dBc reaches the top).
    const barTop = yOf(db);
    doc.rect(x, barTop, slot * 0.6, box.y + box.height - barTop).fill(order % 2 === 0 ? C.accent : C.band);
    const measured = measuredDbc?.[order - 1];
    if (measured !== undefined) {
      const top = yOf(measured);
      doc.lineWidth(1).strokeColor(C.ink).rect(x - 1.5, top, slot * 0.6 + 3, box.y + box.height - top).stroke();
    }
    doc.fillColor(C.soft).text(`H${order}`, box.x + i * slot, box.y + box.height + 2, { width: slot, align: 'center', lineBreak: false });
  });
  doc.fillColor(C.soft).text('dBc', box.x - 16, box.y - 11, { lineBreak: false });
}

/** THD_F (log scale, %) against drive 0…100 %, with a shaded band behind the unit's own curve. */
export function thdAgainstDrive(
  doc: Doc, box: Box, curve: { drive: number; thdF: number }[], band: { drive: number; p5: number; p95: number }[] | null, title: string,
) {
  frame(doc, box, title);
  const values = [...curve.map((p) => p.thdF), ...(band ?? []).flatMap((b) => [b.p5, b.p95])].filter((v) => v > 0);
  const lo = Math.max(1e-4, Math.min(...values));
  const hi = Math.max(...values, 0.5);
  const decadeLo = Math.floor(Math.log10(lo));
  const decadeHi = Math.ceil(Math.log10(hi));
  const xOf = (d: number) => box.x + d * box.width;
  const yOf = (v: number) => box.y + box.height - ((Math.log10(Math.max(v, 10 ** decadeLo)) - decadeLo) / (decadeHi - decadeLo)) * box.height;
  doc.font('body').fontSize(6).fillColor(C.soft);
  for (let e = decadeLo; e <= decadeHi; e++) {
    const v = 10 ** e;
    doc.lineWidth(0.3).strokeColor(C.rule).moveTo(box.x, yOf(v)).lineTo(box.x + box.width, yOf(v)).stroke();
    const label = v * 100 >= 1 ? `${(v * 100).toFixed(0)} %` : `${(v * 100).toPrecision(1)} %`;
    doc.text(label, box.x - 26, yOf(v) - 3, { width: 24, align: 'right', lineBreak: false });
  }
  for (const d of [0, 0.25, 0.5, 0.75, 1]) {
    doc.text(`${Math.round(d * 100)} %`, xOf(d) - 12, box.y + box.height + 2, { width: 24, align: 'center', lineBreak: false });
  }
  if (band && band.length > 1) {
    const upper = band.map((b) => [xOf(b.drive), yOf(b.p95)] as [number, number]);
    const lower = [...band].reverse().map((b) => [xOf(b.drive), yOf(b.p5)] as [number, number]);
    doc.polygon(...upper, ...lower).fill(C.bandFill);
  }
  doc.lineWidth(1.4).strokeColor(C.accent);
  curve.forEach((p, i) => (i === 0 ? doc.moveTo(xOf(p.drive), yOf(p.thdF)) : doc.lineTo(xOf(p.drive), yOf(p.thdF))));
  doc.stroke();
  doc.fillColor(C.soft).text('drive', box.x + box.width - 20, box.y + box.height + 9, { lineBreak: false });
}
