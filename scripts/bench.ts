// `npm run bench`: prints timing figures, section by section (never asserts timings).
// Later sections (e.g. spec sheets) append themselves to this list.
import { engineSection, type BenchSection } from './bench/engine';
import { specSheetSection } from './bench/spec-sheets';
import { loopSection } from './bench/loop';

export const sections: BenchSection[] = [engineSection, specSheetSection, loopSection];

async function main(): Promise<void> {
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  // `npm run bench -- loop` runs the sections whose name contains a word given; none given = all.
  const wanted = process.argv.slice(2);
  for (const section of sections) {
    if (wanted.length && !wanted.some((w) => section.name.includes(w))) continue;
    await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
