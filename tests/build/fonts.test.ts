// The browser's mono font is the committed subset WOFF2 that scripts/fonts/subset-mono.ts makes;
// the PDFs keep the full TTF.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { FONT_FILES } from '../../server/pdf/fonts';
import { buildMonoWoff2, OUTPUT_WOFF2, unicodeRangeCss } from '../../scripts/fonts/subset-mono';

const styles = readFileSync(path.resolve(import.meta.dirname, '../../src/styles.css'), 'utf8');

describe('the mono web font', () => {
  it('is the subset the script makes, as WOFF2, much smaller than the TTF', async () => {
    const committed = readFileSync(OUTPUT_WOFF2);
    // WOFF2 files start with the signature "wOF2" (W3C WOFF 2.0, section 5.1).
    expect(committed.subarray(0, 4).toString('latin1')).toBe('wOF2');
    expect(committed.length).toBeLessThan(48 * 1024);
    expect(committed.length).toBeLessThan(readFileSync(FONT_FILES.mono).length / 5);
    // Re-running the script gives the same bytes, so the committed file is what it makes.
    expect(Buffer.compare(await buildMonoWoff2(), committed)).toBe(0);
  }, 60_000);

  it('is what styles.css loads, over the same unicode-range, and no TTF reaches the browser', () => {
    const face = /@font-face \{ font-family: "Kneepoint Mono";[^}]*\}/.exec(styles)?.[0] ?? '';
    expect(face).toContain('url("./assets/fonts/kneepoint-mono.woff2") format("woff2")');
    expect(face).toContain(`unicode-range: ${unicodeRangeCss()};`);
    expect(styles).not.toMatch(/\.ttf"\)/);
    expect(FONT_FILES.mono).toMatch(/DejaVuSansMono\.ttf$/);
  });
});
