import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { createFormatter, DEFAULT_LOCALE } from '../../shared/format';

// Expected strings follow the Unicode CLDR locale data that Node's and Chromium's ICU carry
// (the formats Intl documents for these locales); a change in ICU's data would show here first.

describe('the one formatter', () => {
  const gb = createFormatter({ locale: 'en-GB', timeZone: 'Europe/Berlin', currency: 'EUR' });

  it('writes a calendar date as that day, wherever the shop is', () => {
    expect(gb.date('2026-12-01')).toBe('1 Dec 2026');
    // A date-only value is not shifted by the time zone: Honolulu is 10 h behind UTC.
    expect(createFormatter({ timeZone: 'Pacific/Honolulu' }).date('2026-12-01')).toBe('1 Dec 2026');
    expect(gb.day('2026-12-01')).toBe('Tue 1 Dec');
  });

  it('writes a moment in the shop’s time zone', () => {
    // 23:30 UTC on 31 Dec is already 1 Jan in Berlin (UTC+1 in winter).
    expect(gb.date('2026-12-31T23:30:00Z')).toBe('1 Jan 2027');
    expect(gb.dateTime('2026-12-01T13:05:00Z')).toBe('1 Dec 2026, 14:05');
    expect(gb.monthYear(new Date('2026-11-30T23:30:00Z'))).toBe('December 2026');
  });

  it('writes money and numbers with the locale’s separators', () => {
    expect(gb.money(123450)).toBe('€1,234.50');
    // Measured values group thousands from five digits on; money and counts from four.
    expect(gb.number(1720, 0)).toBe('1720');
    expect(gb.number(12345.6, 1)).toBe('12,345.6');
    expect(gb.significant(4.7)).toBe('4.7');
    expect(gb.number(0.04567, 3)).toBe('0.046');
    expect(gb.count(2004)).toBe('2,004');
    const de = createFormatter({ locale: 'de-DE', timeZone: 'Europe/Berlin', currency: 'EUR' });
    expect(de.money(123450)).toBe('1.234,50\u00a0€');
    expect(de.number(12345.5, 1)).toBe('12.345,5');
    expect(de.number(0.5, 2)).toBe('0,50');
    expect(de.date('2026-12-01')).toBe('1. Dez. 2026');
  });

  it('falls back to en-GB without a locale, or with one Intl refuses', () => {
    expect(DEFAULT_LOCALE).toBe('en-GB');
    expect(createFormatter({}).date('2026-12-01')).toBe('1 Dec 2026');
    expect(createFormatter({ locale: 'not a locale!' }).locale).toBe('en-GB');
    expect(createFormatter({ locale: null }).number(1.5, 1)).toBe('1.5');
  });

  it('is the only place that calls Intl or toLocale*', () => {
    const offenders: string[] = [];
    const walk = (dir: string) => {
      for (const name of readdirSync(dir)) {
        const file = path.join(dir, name);
        if (statSync(file).isDirectory()) {
          // The payments fake stands in for an outside service and formats its own page.
          if (!file.endsWith(path.join('server', 'fakes'))) walk(file);
        } else if (/\.(ts|tsx)$/.test(name) && file !== path.resolve('shared/format.ts')) {
          const text = readFileSync(file, 'utf8');
          if (/Intl\.(DateTimeFormat|NumberFormat)|toLocale(Date|Time)?String/.test(text)) offenders.push(path.relative(process.cwd(), file));
        }
      }
    };
    for (const dir of ['src', 'server', 'shared']) walk(path.resolve(dir));
    expect(offenders).toEqual([]);
  });
});
