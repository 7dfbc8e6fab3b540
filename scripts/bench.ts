// `npm run bench`: prints timing figures, section by section (never asserts timings).
// Later sections (e.g. spec sheets) append themselves to this list.
import { engineSection, type BenchSection } from './bench/engine';
import { jobsSection } from './bench/jobs';
import { specSheetSection } from './bench/spec-sheets';
import { loopSection } from './bench/loop';
import { wireSection } from './bench/wire';

export const sections: BenchSection[] = [engineSection, specSheetSection, loopSection, jobsSection, wireSection];

async function main(): Promise<void> {
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  // `npm run bench -- jobs` runs only the sections whose names start with one of the arguments.
  const only = process.argv.slice(2);
  for (const section of sections.filter((s) => only.length === 0 || only.some((name) => s.name.startsWith(name)))) {
    await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
