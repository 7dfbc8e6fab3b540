// `npm run bench [-- SECTION …]`: prints timing figures, section by section (never asserts timings).
// Words given run the sections with that key (engine, cli, sheets, loop, jobs, wire, client, design, match, api, plans); none
// given runs all but the two on the production-size dataset: `npm run bench -- api [--scale 5]` (HTTP load, a few minutes)
// and `npm run bench -- plans [--scale 5]` (each route's queries under EXPLAIN ANALYZE).
import { apiSection } from './bench/api';
import { cliSection } from './bench/cli';
import { clientSection } from './bench/client';
import { designSection } from './bench/design';
import { engineSection, type BenchSection } from './bench/engine';
import { jobsSection } from './bench/jobs';
import { specSheetSection } from './bench/spec-sheets';
import { loopSection } from './bench/loop';
import { matchSection } from './bench/match';
import { plansSection } from './bench/plans';
import { wireSection } from './bench/wire';

export const sections: BenchSection[] = [engineSection, cliSection, specSheetSection, loopSection, jobsSection, wireSection, clientSection, designSection, matchSection, apiSection, plansSection];

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const wanted = args.filter((a, i) => !a.startsWith('--') && args[i - 1] !== '--scale');
  const unknown = wanted.filter((w) => !sections.some((s) => s.key === w));
  if (unknown.length > 0) {
    console.error(`unknown bench section(s): ${unknown.join(', ')}; known: ${sections.map((s) => s.key).join(', ')}`);
    process.exit(2);
  }
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  for (const section of sections) {
    if (wanted.length ? !wanted.includes(section.key) : section === apiSection || section === plansSection) continue;
    await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
