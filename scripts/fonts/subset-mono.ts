// The browser's mono font: DejaVu Sans Mono (from the dejavu-fonts-ttf package) cut down to the
// characters Kneepoint shows in it (serials, figures, units, arrows) and packed as WOFF2.
// Re-run after changing RANGES:  npm run fonts
// The output is committed (src/assets/fonts/); the full TTF stays for the PDFs (server/pdf/fonts.ts).
// src/styles.css declares the same ranges as its unicode-range, so any other character falls back
// to the system's monospace font instead of a missing glyph; tests/build/fonts.test.ts checks both.
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import subsetFont from 'subset-font';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const SOURCE_TTF = path.join(ROOT, 'node_modules', 'dejavu-fonts-ttf', 'ttf', 'DejaVuSansMono.ttf');
export const OUTPUT_WOFF2 = path.join(ROOT, 'src', 'assets', 'fonts', 'kneepoint-mono.woff2');

/** Code point ranges kept, inclusive: Latin, punctuation, units and the symbols the screens use. */
export const RANGES: [number, number][] = [
  [0x0020, 0x007e], // Basic Latin
  [0x00a0, 0x017f], // Latin-1 Supplement and Latin Extended-A (°, ±, µ, ×, names)
  [0x0391, 0x03c9], // Greek (Ω, Δ, μ)
  [0x2010, 0x2027], // dashes, quotes, bullet, ellipsis
  [0x2030, 0x203a], // per mille, primes, angle quotes
  [0x2070, 0x209c], // superscripts and subscripts
  [0x20ac, 0x20ac], // euro sign
  [0x2122, 0x2126], // trade mark, ohm sign
  [0x2190, 0x2195], // arrows
  [0x2212, 0x2212], // minus sign
  [0x221e, 0x221e], // infinity
  [0x2248, 0x2248], // almost equal
  [0x2260, 0x2265], // not equal, less/greater or equal
  [0x2713, 0x2717], // check and cross marks
];

const hex = (n: number) => n.toString(16).toUpperCase().padStart(4, '0');

/** The CSS unicode-range value for RANGES, as written in src/styles.css. */
export function unicodeRangeCss(): string {
  return RANGES.map(([a, b]) => (a === b ? `U+${hex(a)}` : `U+${hex(a)}-${hex(b)}`)).join(', ');
}

/** The subset WOFF2, made from the package's TTF. */
export async function buildMonoWoff2(): Promise<Buffer> {
  let text = '';
  for (const [a, b] of RANGES) for (let c = a; c <= b; c++) text += String.fromCodePoint(c);
  return subsetFont(readFileSync(SOURCE_TTF), text, { targetFormat: 'woff2' });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const woff2 = await buildMonoWoff2();
  writeFileSync(OUTPUT_WOFF2, woff2);
  const kib = (n: number) => `${(n / 1024).toFixed(1)} KiB`;
  console.log(`${path.relative(ROOT, OUTPUT_WOFF2)}: ${kib(woff2.length)} (from ${kib(readFileSync(SOURCE_TTF).length)} TTF)`);
  console.log(`unicode-range: ${unicodeRangeCss()}`);
}
