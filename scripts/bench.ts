// `npm run bench`: prints timing figures, section by section (never asserts timings).
// `npm run bench -- engine client` runs only the named sections (by their `key`).
// Later sections (e.g. spec sheets) append themselves to this list.
import { clientSection } from './bench/client';
import { engineSection, type BenchSection } from './bench/engine';
import { specSheetSection } from './bench/spec-sheets';

export const sections: BenchSection[] = [engineSection, specSheetSection, clientSection];

async function main(): Promise<void> {
  const wanted = process.argv.slice(2);
  const unknown = wanted.filter((w) => !sections.some((s) => s.key === w));
  if (unknown.length > 0) {
    console.error(`unknown bench section(s): ${unknown.join(', ')}; known: ${sections.map((s) => s.key).join(', ')}`);
    process.exit(2);
  }
  console.log(`Kneepoint benchmark — Node ${process.version}, ${new Date().toISOString()}`);
  for (const section of sections) {
    if (wanted.length === 0 || wanted.includes(section.key)) await section.run();
  }
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
