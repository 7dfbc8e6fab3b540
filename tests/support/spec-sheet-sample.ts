import type { SpecSheetData } from '../../server/pdf/spec-sheet-data';
import { forwardVoltage, findPreset } from '../../shared/engine';
import { nominalBand, sheetProfile } from '../../server/services/spec-sheets/sheet-profile';
import { ASYMMETRIC_SILICON_LED_SHUNT } from './circuits';

/** A sheet's data for an invented unit, for renderer tests. */
export function sampleSheetData(measured = { positive: [0.603], negative: [1.792] }): SpecSheetData {
  const si = findPreset('si-small-signal')!.model;
  const led = findPreset('led-red')!.model;
  const profile = sheetProfile(ASYMMETRIC_SILICON_LED_SHUNT, { ...measured, testCurrentA: 1e-3 }, nominalBand(ASYMMETRIC_SILICON_LED_SHUNT, 5, 20));
  const reference = profile.points[1];
  return {
    paper: 'A4',
    shop: { name: 'Hollowmere Effects', address: 'Kiln Yard 7, 10999 Berlin', email: 'workshop@shop.example' },
    unit: { serial: 'HM-TST-2612-0007', model: 'Test Drive', revision: '2', batch: 'B-TEST-01', builtOn: '28 Nov 2026', testedOn: '30 Nov 2026', assembler: 'J. A.', tester: 'O. V.' },
    option: { name: 'Silicon against red LED', topology: 'shunt', description: '' },
    devices: [
      { side: 'positive', position: 0, name: 'Silicon small-signal', nominalVf: forwardVoltage(si, 1e-3), measuredVf: measured.positive[0] },
      { side: 'negative', position: 0, name: 'LED, red', nominalVf: forwardVoltage(led, 1e-3), measuredVf: measured.negative[0] },
    ],
    testCurrentMa: 1,
    profile,
    qa: { currentDrawMa: 7.4, measuredThdPercent: reference.thdF * 100 * 1.04, measuredHarmonicsDbc: null, measuredThdRPercent: null, predictedThdPercent: reference.thdF * 100, tolerancePercent: 15, verdict: 'passed' },
    power: { supplyV: 9, currentMa: 7.4 },
    verifyUrl: 'http://127.0.0.1:3000/verify/HM-TST-2612-0007',
    issuedAt: new Date('2026-11-30T15:00:00Z'),
  };
}
