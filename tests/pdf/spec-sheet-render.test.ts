import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PDFParse } from 'pdf-parse';
import { describe, expect, it } from 'vitest';
import { perUnitCircuit, resolveCircuit } from '../../shared/engine';
import { formatDbc, formatPercent, renderSpecSheet } from '../../server/pdf/spec-sheet';
import { operatingPoint } from '../../server/services/spec-sheets/sheet-profile';
import { SPEC_SHEET_LAYOUT } from '../../templates/pdf/spec-sheet-layout';
import { ASYMMETRIC_SILICON_LED_SHUNT } from '../support/circuits';
import { sampleSheetData } from '../support/spec-sheet-sample';

async function pdfText(pdf: Buffer) {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  const result = await parser.getText();
  await parser.destroy();
  return result.text;
}

/** The table's numbers recomputed straight from the engine for the same measured devices. */
function expectedTable(measured: { positive: number[]; negative: number[] }) {
  const circuit = perUnitCircuit(resolveCircuit(ASYMMETRIC_SILICON_LED_SHUNT), { ...measured, testCurrentA: 1e-3 });
  return SPEC_SHEET_LAYOUT.tableDrives.map(({ drive }) => operatingPoint(circuit, drive ?? circuit.referenceDrive));
}

describe('spec sheet PDF', () => {
  it('prints the serial, the option and every number of the harmonic table as the engine computes them', async () => {
    const measured = { positive: [0.603], negative: [1.792] };
    const text = await pdfText(await renderSpecSheet(sampleSheetData(measured)));
    expect(text).toContain('HM-TST-2612-0007');
    expect(text).toContain('Silicon against red LED');
    expect(text).toContain('THD_F');
    expect(text).toContain('THD_R');
    const lines = text.split('\n');
    const table = expectedTable(measured);
    for (let k = 0; k < SPEC_SHEET_LAYOUT.harmonicsInTable; k++) {
      const row = lines.find((l) => l.trim().startsWith(`H${k + 1}\t`) || l.trim().startsWith(`H${k + 1} `));
      expect(row, `row H${k + 1}`).toBeTruthy();
      for (const point of table) expect(row).toContain(formatDbc(point.harmonics[k].dbc));
    }
    const thdRow = lines.find((l) => l.trim().startsWith('THD_F') && l.includes('%'))!;
    for (const point of table) expect(thdRow).toContain(formatPercent(point.thdF));
  });

  it('gives a unit with other measured forward voltages a different table', async () => {
    const a = await pdfText(await renderSpecSheet(sampleSheetData({ positive: [0.603], negative: [1.792] })));
    const b = await pdfText(await renderSpecSheet(sampleSheetData({ positive: [0.571], negative: [1.861] })));
    const h2 = (t: string) => t.split('\n').find((l) => l.trim().startsWith('H2'));
    expect(h2(a)).not.toEqual(h2(b));
    const expectedB = expectedTable({ positive: [0.571], negative: [1.861] });
    expect(h2(b)).toContain(formatDbc(expectedB[1].harmonics[1].dbc));
  });

  it('is the same document for the same unit', async () => {
    const one = await renderSpecSheet(sampleSheetData());
    const two = await renderSpecSheet(sampleSheetData());
    expect(await pdfText(one)).toEqual(await pdfText(two));
  });

  it('renders page 1 to a picture that is not blank (pdftoppm from poppler-utils)', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'kneepoint-sheet-'));
    const file = path.join(dir, 'sheet.pdf');
    writeFileSync(file, await renderSpecSheet(sampleSheetData()));
    execFileSync('pdftoppm', ['-r', '30', '-gray', '-f', '1', '-l', '1', file, path.join(dir, 'page')]);
    const pgm = readFileSync(path.join(dir, 'page-1.pgm'));
    // Binary PGM: header of three lines, then one byte a pixel.
    const header = pgm.subarray(0, 20).toString('latin1').split('\n');
    const pixels = pgm.subarray(header.slice(0, 3).join('\n').length + 1);
    const dark = pixels.filter((v) => v < 128).length;
    expect(dark / pixels.length).toBeGreaterThan(0.03);
  });

  it('prints on US Letter when the shop asks for it', async () => {
    const pdf = await renderSpecSheet({ ...sampleSheetData(), paper: 'Letter' });
    expect(pdf.toString('latin1')).toMatch(/\/MediaBox \[0 0 612 792\]/);
  });
});
