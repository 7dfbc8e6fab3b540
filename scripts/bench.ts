// `npm run bench [-- SECTION …]`: prints timing figures, section by section (never asserts timings).
// A word given runs the sections whose name contains it (engine, sheets, loop, jobs, api); none given runs
// all but `api` (HTTP load over the production-size dataset, a few minutes): `npm run bench -- api [--scale 5]`.
import { apiSection } from './bench/api';
import { engineSection, type BenchSection } from './bench/engine';
import { jobsSection } from './bench/jobs';
import { specSheetSection } from './bench/spec-sheets';
import { loopSection } from './bench/loop';

export const sections: BenchSection[] = [engineSection, specSheetSection, loopSection, jobsSection, apiSection];

async function main(): Promise<void> {
  const wanted = process.argv.slice(2).filter((a, i, all) => !a.startsWith('--') && all[i - 1] !== '--scale');
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  for (const section of sections) {
    if (wanted.length ? !wanted.some((w) => section.name.includes(w)) : section === apiSection) continue;
    await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
