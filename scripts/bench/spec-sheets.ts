// Spec sheet section of `npm run bench`: ms per sheet (this unit's engine recompute + the PDF) and
// seconds for a 100-unit batch archive (sheets + zip), with the option's band cached as in production.
// Targets: ≤ 150 ms a sheet, ≤ 20 s for 100 on the 2-core machine. Prints figures only.
import { renderSpecSheet } from '../../server/pdf/spec-sheet';
import { zipArchive } from '../../server/services/spec-sheets/batch-jobs';
import { nominalBand, sheetProfile } from '../../server/services/spec-sheets/sheet-profile';
import { ASYMMETRIC_SILICON_LED_SHUNT } from '../../tests/support/circuits';
import { sampleSheetData } from '../../tests/support/spec-sheet-sample';
import type { BenchSection } from './engine';

const TARGET_SHEET_MS = 150;
const TARGET_BATCH_S = 20;

function median(xs: number[]) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export const specSheetSection: BenchSection = {
  key: 'sheets',
  name: 'spec sheets',
  run: async () => {
    console.log('\n## Spec sheets (engine recompute from measured Vf + PDF render; band cached)');
    const t0 = performance.now();
    const band = nominalBand(ASYMMETRIC_SILICON_LED_SHUNT);
    const bandMs = performance.now() - t0;
    const base = sampleSheetData();
    // A different unit each time: readings spread around the nominal silicon / red LED values.
    const unit = (i: number) => {
      const measured = { positive: [0.585 + (i % 9) * 0.005], negative: [1.76 + (i % 7) * 0.012], testCurrentA: 1e-3 };
      const profile = sheetProfile(ASYMMETRIC_SILICON_LED_SHUNT, measured, band);
      return { ...base, unit: { ...base.unit, serial: `HM-B0100-${String(i + 1).padStart(3, '0')}` }, profile };
    };
    for (let i = 0; i < 3; i++) await renderSpecSheet(unit(i)); // warm-up

    const profileMs: number[] = [];
    const renderMs: number[] = [];
    for (let i = 0; i < 20; i++) {
      const a = performance.now();
      const data = unit(i);
      const b = performance.now();
      await renderSpecSheet(data);
      profileMs.push(b - a);
      renderMs.push(performance.now() - b);
    }
    const sheet = median(profileMs) + median(renderMs);
    console.log(`nominal band (computed once per option, then cached): ${bandMs.toFixed(0)} ms`);
    console.log(`per sheet: ${sheet.toFixed(1)} ms median (engine ${median(profileMs).toFixed(1)} ms + PDF ${median(renderMs).toFixed(1)} ms) — target ≤ ${TARGET_SHEET_MS} ms`);

    const start = performance.now();
    const entries = [];
    for (let i = 0; i < 100; i++) {
      const data = unit(i);
      entries.push({ name: `${data.unit.serial}.pdf`, data: await renderSpecSheet(data), date: data.issuedAt });
    }
    const zip = await zipArchive(entries);
    const seconds = (performance.now() - start) / 1000;
    console.log(`100-unit batch archive: ${seconds.toFixed(1)} s (${(zip.length / 1e6).toFixed(1)} MB zip) — target ≤ ${TARGET_BATCH_S} s`);
  },
};
