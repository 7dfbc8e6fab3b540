import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PDFParse } from 'pdf-parse';
import { beforeAll, describe, expect, it } from 'vitest';
import { perUnitCircuit, resolveCircuit } from '../../shared/engine';
import { renderSpecSheet } from '../../server/pdf/spec-sheet';
import { ASYMMETRIC_SILICON_LED_SHUNT } from '../support/circuits';
import { ngspiceForwardVoltage, requireNgspice } from '../support/ngspice';
import { expectTableAgreesWithNgspice } from '../support/spec-sheet-ngspice';
import { sampleSheetData } from '../support/spec-sheet-sample';

async function pdfText(pdf: Buffer) {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  const result = await parser.getText();
  await parser.destroy();
  return result.text;
}

/** The unit's circuit: the option's presets with IS refitted to the measured Vf (checked against ngspice below). */
function unitCircuit(measured: { positive: number[]; negative: number[] }) {
  return perUnitCircuit(resolveCircuit(ASYMMETRIC_SILICON_LED_SHUNT), { ...measured, testCurrentA: 1e-3 });
}

describe('spec sheet PDF', () => {
  beforeAll(() => requireNgspice());

  it('prints the serial, the option and a harmonic table that agrees with ngspice for this unit', async () => {
    const measured = { positive: [0.603], negative: [1.792] };
    const text = await pdfText(await renderSpecSheet(sampleSheetData(measured)));
    expect(text).toContain('HM-TST-2612-0007');
    expect(text).toContain('Silicon against red LED');
    expect(text).toContain('THD_F');
    expect(text).toContain('THD_R');
    const circuit = unitCircuit(measured);
    // Outside check of the refit: ngspice's DC operating point of each refitted device at the bench test
    // current gives back the measured Vf (to 0.1 mV).
    expect(Math.abs(ngspiceForwardVoltage(circuit.network.positive[0], 1e-3) - 0.603)).toBeLessThan(1e-4);
    expect(Math.abs(ngspiceForwardVoltage(circuit.network.negative[0], 1e-3) - 1.792)).toBeLessThan(1e-4);
    expectTableAgreesWithNgspice(text, circuit);
  });

  it('gives a unit with other measured forward voltages a different table, again as ngspice has it', async () => {
    const a = await pdfText(await renderSpecSheet(sampleSheetData({ positive: [0.603], negative: [1.792] })));
    const b = await pdfText(await renderSpecSheet(sampleSheetData({ positive: [0.571], negative: [1.861] })));
    const h2 = (t: string) => t.split('\n').find((l) => l.trim().startsWith('H2'));
    expect(h2(a)).not.toEqual(h2(b));
    expectTableAgreesWithNgspice(b, unitCircuit({ positive: [0.571], negative: [1.861] }));
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
