// One unit's spec sheet as a PDF: real, selectable text and vector charts, laid out per
// templates/pdf/spec-sheet-layout.ts. Pure: the same data always gives the same document.
import PDFDocument from 'pdfkit';
import { SPEC_SHEET_LAYOUT as L } from '../../templates/pdf/spec-sheet-layout';
import { spectrumBars, thdAgainstDrive } from './charts';
import { drawQr } from './codes';
import { registerFonts } from './fonts';
import type { SpecSheetData } from './spec-sheet-data';

type Doc = PDFKit.PDFDocument;
const C = L.colours;

export const formatDbc = (db: number) => (db === 0 ? '0' : db < -120 ? '< −120' : db.toFixed(1).replace('-', '−'));
export const formatPercent = (ratio: number) => `${(ratio * 100).toFixed(ratio < 0.01 ? 3 : 2)} %`;
export const formatVolts = (v: number) => `${(v * 1000).toFixed(0)} mV`;

const TOPOLOGY_WORDS = {
  shunt: 'Hard clipping: the diodes shunt the signal to ground after a series resistor.',
  feedback: 'Soft clipping: the diodes sit across the op-amp’s feedback resistor; the clean signal always passes.',
  none: 'No clipping devices: the drive stage alone shapes the tone.',
} as const;

function heading(doc: Doc, text: string, x: number, y: number, width: number) {
  doc.font('bold').fontSize(L.sizes.heading).fillColor(C.accent).text(text, x, y, { width, lineBreak: false });
  doc.lineWidth(0.6).strokeColor(C.rule).moveTo(x, y + 14).lineTo(x + width, y + 14).stroke();
  return y + 20;
}

function pairs(doc: Doc, rows: [string, string][], x: number, y: number, labelWidth: number, width: number) {
  for (const [label, value] of rows) {
    doc.font('body').fontSize(L.sizes.body).fillColor(C.soft).text(label, x, y, { width: labelWidth, lineBreak: false });
    doc.font('semibold').fillColor(C.ink).text(value, x + labelWidth, y, { width: width - labelWidth, lineBreak: false });
    y += 12.5;
  }
  return y;
}

/** A plain sentence about the even/odd balance, e.g. "mostly even harmonics (62 % of the distortion energy)…". */
export function evenOddSentence(evenShare: number) {
  const even = Math.round(evenShare * 100);
  if (even < 1) return 'At the reference setting the distortion is made of odd harmonics only: a symmetric, tighter-sounding clip.';
  if (even >= 50) return `At the reference setting ${even} % of the distortion energy is in even harmonics: the asymmetric clip adds octave-related warmth.`;
  return `At the reference setting ${even} % of the distortion energy is in even harmonics and ${100 - even} % in odd ones.`;
}

/** The bench's measured values for the table's measured column: H1…H8 in dBc, then THD_F and THD_R; '—' where nothing was measured. */
export function measuredColumn(qa: NonNullable<SpecSheetData['qa']>): string[] {
  const harmonics = Array.from({ length: L.harmonicsInTable }, (_, k) => {
    const db = qa.measuredHarmonicsDbc?.[k];
    return db === undefined ? '—' : formatDbc(db);
  });
  return [
    ...harmonics,
    qa.measuredThdPercent === null ? '—' : formatPercent(qa.measuredThdPercent / 100),
    qa.measuredThdRPercent === null ? '—' : formatPercent(qa.measuredThdRPercent / 100),
  ];
}

function table(doc: Doc, data: SpecSheetData, x: number, y: number, width: number) {
  const cols = data.profile.points;
  const referenceIndex = Math.max(0, cols.findIndex((p) => p.label === 'Reference'));
  // Columns: each drive setting's prediction; with a bench test, the measured values right beside the reference.
  const columns: { title: string; values: string[] }[] = cols.map((p) => ({
    title: `${p.label} (${Math.round(p.drive * 100)} %)`,
    values: [...p.harmonicsDbc.slice(0, L.harmonicsInTable).map(formatDbc), formatPercent(p.thdF), formatPercent(p.thdR)],
  }));
  if (data.qa) columns.splice(referenceIndex + 1, 0, { title: 'Measured', values: measuredColumn(data.qa) });
  const first = 92;
  const colWidth = (width - first) / columns.length;
  doc.font('semibold').fontSize(L.sizes.body).fillColor(C.ink);
  doc.text('Harmonic (dBc)', x, y, { width: first, lineBreak: false });
  columns.forEach((c, i) => doc.text(c.title, x + first + i * colWidth, y, { width: colWidth, align: 'right', lineBreak: false }));
  y += 13;
  const labels = [...Array.from({ length: L.harmonicsInTable }, (_, k) => `H${k + 1}`), 'THD_F', 'THD_R'];
  labels.forEach((label, r) => {
    if (r % 2 === 0) doc.rect(x, y - 2, width, 11.5).fill(C.fill);
    doc.font('body').fontSize(L.sizes.body).fillColor(C.ink).text(label, x + 3, y, { width: first, lineBreak: false });
    doc.font('mono').fontSize(8);
    columns.forEach((c, i) => doc.text(c.values[r], x + first + i * colWidth, y + 0.5, { width: colWidth - 3, align: 'right', lineBreak: false }));
    y += 11.5;
  });
  const measuredNote = data.qa ? ` Measured: the bench test at the reference setting${data.qa.measuredHarmonicsDbc ? ', read from its WAV capture' : ' (THD typed from the analyser; no capture, so no harmonics)'}.` : '';
  doc.font('body').fontSize(L.sizes.small).fillColor(C.soft).text(
    `THD_F = √(ΣVk², k≥2) / V1 (relative to the fundamental); THD_R = √(ΣVk², k≥2) / √(ΣVk², k≥1) (relative to the whole signal); both over H1–H${L.harmonicsInThd}. 1 kHz test tone.${measuredNote}`,
    x, y + 2, { width },
  );
  return doc.y + 4;
}

/** Renders the sheet; resolves to the PDF bytes. */
export async function renderSpecSheet(data: SpecSheetData): Promise<Buffer> {
  const doc = new PDFDocument({
    size: data.paper === 'Letter' ? 'LETTER' : 'A4',
    margin: L.margin,
    info: { Title: `Spec sheet ${data.unit.serial}`, Author: data.shop.name, Subject: `${data.unit.model} — ${data.option.name}`, CreationDate: data.issuedAt, ModDate: data.issuedAt },
  });
  registerFonts(doc);
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));

  const m = L.margin;
  const width = doc.page.width - 2 * m;
  const half = (width - 18) / 2;

  // Band across the top: shop, what this is, the serial.
  doc.rect(0, 0, doc.page.width, 64).fill(C.band);
  doc.font('bold').fontSize(L.sizes.title).fillColor(C.bandText).text(data.shop.name, m, 16, { lineBreak: false });
  doc.font('body').fontSize(L.sizes.body).fillColor('#c9d6cf').text(`${data.unit.model} · unit spec sheet`, m, 39, { lineBreak: false });
  doc.font('mono').fontSize(L.sizes.serial).fillColor(C.amber).text(data.unit.serial, m, 22, { width, align: 'right', lineBreak: false });

  let y = heading(doc, L.headings.identity, m, 80, half);
  pairs(doc, [
    ['Model', `${data.unit.model}, revision ${data.unit.revision}`],
    ['Serial number', data.unit.serial],
    ['Batch', data.unit.batch],
    ['Built', data.unit.builtOn ?? '—'],
    ['Tested', data.unit.testedOn ?? '—'],
    ['Built by', data.unit.assembler],
    ['Tested by', data.unit.tester],
  ], m, y, 82, half);

  const ox = m + half + 18;
  y = heading(doc, L.headings.option, ox, 80, half);
  doc.font('semibold').fontSize(L.sizes.body + 1).fillColor(C.ink).text(data.option.name, ox, y, { width: half });
  doc.font('body').fontSize(L.sizes.small + 0.5).fillColor(C.soft).text(TOPOLOGY_WORDS[data.option.topology], ox, doc.y + 1, { width: half });
  y = doc.y + 4;
  doc.font('semibold').fontSize(L.sizes.small + 0.5).fillColor(C.ink);
  doc.text('Side', ox, y, { width: 52, lineBreak: false });
  doc.text('Device', ox + 52, y, { width: 100, lineBreak: false });
  doc.text(`Nominal Vf`, ox + half - 110, y, { width: 55, align: 'right', lineBreak: false });
  doc.text(`Measured Vf`, ox + half - 55, y, { width: 55, align: 'right', lineBreak: false });
  y += 11;
  for (const d of data.devices) {
    doc.font('body').fontSize(L.sizes.small + 0.5).fillColor(C.ink);
    doc.text(`${d.side === 'positive' ? '+' : '−'} ${d.position + 1}`, ox, y, { width: 52, lineBreak: false });
    doc.text(d.name, ox + 52, y, { width: half - 165, lineBreak: false });
    doc.font('mono').fontSize(7.5);
    doc.text(formatVolts(d.nominalVf), ox + half - 110, y, { width: 55, align: 'right', lineBreak: false });
    doc.text(d.measuredVf === null ? '—' : formatVolts(d.measuredVf), ox + half - 55, y, { width: 55, align: 'right', lineBreak: false });
    y += 10.5;
  }
  doc.font('body').fontSize(L.sizes.small).fillColor(C.soft).text(`Forward voltages at ${data.testCurrentMa} mA, 27 °C.`, ox, y + 1, { width: half });

  y = heading(doc, L.headings.profile, m, 196, width);
  doc.font('body').fontSize(L.sizes.small + 0.5).fillColor(C.soft).text(
    data.devices.some((d) => d.measuredVf !== null)
      ? 'Computed from the forward voltages measured on this unit’s own clipping devices (diode equation with series resistance; saturation current refitted per device).'
      : 'Computed from the nominal devices of this option: no measured forward voltages were recorded for this unit.',
    m, y, { width },
  );
  y = table(doc, data, m, doc.y + 6, width);

  const chartTop = y + 18;
  const reference = data.profile.points.find((p) => p.label === 'Reference') ?? data.profile.points[0];
  const measuredSpectrum = data.qa?.measuredHarmonicsDbc ?? null;
  spectrumBars(
    doc, { x: m + 18, y: chartTop, width: half - 18, height: 110 }, reference.harmonicsDbc,
    measuredSpectrum ? `Spectrum at ${Math.round(reference.drive * 100)} % drive: bars predicted, outlines measured` : `Spectrum at the reference setting (${Math.round(reference.drive * 100)} % drive)`, -80, measuredSpectrum,
  );
  thdAgainstDrive(doc, { x: ox + 28, y: chartTop, width: half - 28, height: 110 }, data.profile.sweep, data.profile.band, 'THD_F against drive (shaded: the option’s P5–P95 spread)');
  y = chartTop + 126;
  const onset = data.profile.clippingOnsetDrive;
  const onsetText = onset === null ? 'THD_F stays below 1 % over the whole drive range.' : onset === 0 ? 'THD_F is above 1 % even at minimum drive.' : `Clipping sets in (THD_F crosses 1 %) at ${Math.round(onset * 100)} % drive.`;
  doc.font('body').fontSize(L.sizes.body).fillColor(C.ink).text(`${onsetText} ${evenOddSentence(reference.evenShare)}`, m, y, { width });

  y = heading(doc, L.headings.qa, m, doc.y + 10, half);
  if (data.qa) {
    const within = data.qa.measuredThdPercent === null ? null : Math.abs(data.qa.measuredThdPercent - data.qa.predictedThdPercent) <= (data.qa.tolerancePercent / 100) * data.qa.predictedThdPercent;
    pairs(doc, [
      ['Verdict', data.qa.verdict === 'passed' ? 'Passed' : data.qa.verdict === 'failed' ? 'Failed' : 'Not tested'],
      ['Current draw', data.qa.currentDrawMa === null ? '—' : `${data.qa.currentDrawMa.toFixed(1)} mA`],
      ['THD measured', data.qa.measuredThdPercent === null ? '—' : `${data.qa.measuredThdPercent.toFixed(2)} %`],
      ['THD predicted', `${data.qa.predictedThdPercent.toFixed(2)} %`],
      ['Tolerance', `± ${data.qa.tolerancePercent} % of predicted${within === null ? '' : within ? ' — within' : ' — outside'}`],
    ], m, y, 82, half);
  } else {
    doc.font('body').fontSize(L.sizes.body).fillColor(C.soft).text('This unit has no bench test recorded yet.', m, y, { width: half });
  }

  const py = heading(doc, L.headings.power, ox, y - 20, half);
  pairs(doc, [
    ['Power', `${data.power.supplyV} V DC, centre-negative`],
    ['Current draw', data.power.currentMa === null ? '—' : `${data.power.currentMa.toFixed(1)} mA measured`],
  ], ox, py, 82, half);
  doc.font('body').fontSize(L.sizes.small).fillColor(C.soft);
  let cy = py + 28;
  for (const caution of L.cautions) {
    doc.text(`• ${caution}`, ox, cy, { width: half });
    cy = doc.y + 2;
  }

  const footY = doc.page.height - m - 62;
  doc.lineWidth(0.6).strokeColor(C.rule).moveTo(m, footY - 6).lineTo(m + width, footY - 6).stroke();
  drawQr(doc, data.verifyUrl, m, footY, 60, C.ink);
  doc.font('semibold').fontSize(L.sizes.body).fillColor(C.ink).text('Check this unit is genuine', m + 72, footY + 6, { lineBreak: false });
  doc.font('mono').fontSize(7.5).fillColor(C.soft).text(data.verifyUrl, m + 72, footY + 20, { lineBreak: false });
  doc.font('body').fontSize(L.sizes.small).fillColor(C.soft).text(`${data.shop.name} · ${data.shop.address} · ${data.shop.email}`, m + 72, footY + 34, { width: width - 72 });

  doc.end();
  return done;
}
