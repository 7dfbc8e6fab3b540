// `npm run bench`: prints timing figures, section by section (never asserts timings).
// Later sections (e.g. spec sheets) append themselves to this list.
import { engineSection, type BenchSection } from './bench/engine';
import { specSheetSection } from './bench/spec-sheets';

export const sections: BenchSection[] = [engineSection, specSheetSection];

async function main(): Promise<void> {
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  for (const section of sections) {
    await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
