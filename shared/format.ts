// The one owner of how Kneepoint writes dates, times, money and numbers for people: every screen
// (through src/lib/format.ts), mail and PDF (through server/services/format.ts) formats with these,
// in the shop's locale, time zone and currency from its settings. Nothing else calls Intl or
// toLocale*; a number meant for a form field or a file stays plain (toFixed / String).

/** The locale used until the shop's settings say otherwise, e.g. 1 Dec 2026 and 1,234.5. */
export const DEFAULT_LOCALE = 'en-GB';
export const DEFAULT_TIME_ZONE = 'Europe/Berlin';
export const DEFAULT_CURRENCY = 'EUR';

export interface FormatSettings {
  locale?: string | null;
  timeZone?: string | null;
  currency?: string | null;
}

/** A calendar date without a time of day (YYYY-MM-DD): the same day wherever it is read. */
const CALENDAR_DATE = /^\d{4}-\d{2}-\d{2}$/;

/** Whether Intl takes the text as one BCP 47 language tag, e.g. 'de-DE' yes, 'German' no (the settings form checks with it). */
export function isUsableLocale(value: string): boolean {
  try {
    return Intl.getCanonicalLocales(value).length === 1 && new Intl.NumberFormat(value).resolvedOptions().locale.length > 0;
  } catch {
    return false;
  }
}

/** Whether Intl knows the IANA time zone, e.g. 'Europe/Berlin' yes, 'Mars/Base' no. */
export function isUsableTimeZone(value: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: value });
    return true;
  } catch {
    return false;
  }
}

// Making an Intl formatter costs far more than using one (a list of 25 builds spent a third of its
// time making them), so the formatters below are made once per zone or locale and kept.
const dayFormats = new Map<string, Intl.DateTimeFormat>();
const regionNames = new Map<string, Intl.DisplayNames>();

/** A moment as its calendar day (YYYY-MM-DD) in `timeZone`: a value for comparing days, not for people. */
export function calendarDay(moment: Date | string, timeZone: string): string {
  let format = dayFormats.get(timeZone);
  if (!format) {
    // en-CA writes dates as YYYY-MM-DD.
    format = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    dayFormats.set(timeZone, format);
  }
  return format.format(new Date(moment));
}

/** A country's name from its ISO 3166-1 alpha-2 code, e.g. 'CH' → 'Switzerland' (the code itself when unknown). */
export function countryName(code: string, locale: string = DEFAULT_LOCALE): string {
  try {
    const tag = usableLocale(locale);
    let names = regionNames.get(tag);
    if (!names) regionNames.set(tag, (names = new Intl.DisplayNames([tag], { type: 'region' })));
    return names.of(code) ?? code;
  } catch {
    return code;
  }
}

/** A locale Intl accepts, else the default (a typo in the settings must not blank every page). */
function usableLocale(locale: string | null | undefined): string {
  if (!locale) return DEFAULT_LOCALE;
  try {
    return Intl.getCanonicalLocales(locale)[0] ?? DEFAULT_LOCALE;
  } catch {
    return DEFAULT_LOCALE;
  }
}

export interface Formatter {
  locale: string;
  timeZone: string;
  currency: string;
  /** Integer cents as money, e.g. 18900 → "€189.00". */
  money(cents: number): string;
  /** A day, e.g. "1 Dec 2026"; a YYYY-MM-DD string is that calendar day, a timestamp its day in the shop's time zone. */
  date(value: string | Date): string;
  /** A moment, e.g. "1 Dec 2026, 14:05", in the shop's time zone. */
  dateTime(value: string | Date): string;
  /** A day in a plan or calendar column, e.g. "Tue 1 Dec". */
  day(value: string | Date): string;
  /** Month and year, e.g. "December 2026". */
  monthYear(value: string | Date): string;
  /**
   * A measured value with a fixed count of decimals, e.g. number(1720, 0) → "1720", number(12345.6, 1)
   * → "12,345.6": thousands are grouped from five digits on, as technical values are usually written.
   */
  number(value: number, decimals?: number): string;
  /** A whole count, e.g. 2004 → "2,004". */
  count(value: number): string;
  /** At most `digits` significant digits, no trailing zeros, e.g. significant(4700 / 1000) → "4.7" (grouped like number). */
  significant(value: number, digits?: number): string;
  /** Scientific notation with `decimals` after the point, e.g. scientific(2.52e-9, 3) → "2.520E-9". */
  scientific(value: number, decimals?: number): string;
}

/** A formatter for the shop's locale, time zone and currency, e.g. createFormatter({locale: 'de-DE'}).date('2026-12-01') → "01.12.2026". */
export function createFormatter(settings: FormatSettings = {}): Formatter {
  const locale = usableLocale(settings.locale);
  const timeZone = settings.timeZone || DEFAULT_TIME_ZONE;
  const currency = (settings.currency || DEFAULT_CURRENCY).toUpperCase();
  const moneyFormat = new Intl.NumberFormat(locale, { style: 'currency', currency });
  const countFormat = new Intl.NumberFormat(locale, { maximumFractionDigits: 0 });
  const numberFormats = new Map<string, Intl.NumberFormat>();
  const cached = (key: string, options: Intl.NumberFormatOptions) => {
    let f = numberFormats.get(key);
    if (!f) numberFormats.set(key, (f = new Intl.NumberFormat(locale, options)));
    return f;
  };
  const dates = (options: Intl.DateTimeFormatOptions) => ({
    zoned: new Intl.DateTimeFormat(locale, { ...options, timeZone }),
    calendar: new Intl.DateTimeFormat(locale, { ...options, timeZone: 'UTC' }),
  });
  const dateFormat = dates({ day: 'numeric', month: 'short', year: 'numeric' });
  const dayFormat = dates({ weekday: 'short', day: 'numeric', month: 'short' });
  const monthFormat = dates({ month: 'long', year: 'numeric' });
  const dateTimeFormat = new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone });
  const asDate = (formats: ReturnType<typeof dates>, value: string | Date) =>
    typeof value === 'string' && CALENDAR_DATE.test(value)
      ? formats.calendar.format(new Date(`${value}T00:00:00Z`))
      : formats.zoned.format(new Date(value));
  return {
    locale, timeZone, currency,
    money: (cents) => moneyFormat.format(cents / 100),
    date: (value) => asDate(dateFormat, value),
    dateTime: (value) => dateTimeFormat.format(new Date(value)),
    day: (value) => asDate(dayFormat, value),
    monthYear: (value) => asDate(monthFormat, value),
    number: (value, decimals = 0) => cached(`f${decimals}`, { minimumFractionDigits: decimals, maximumFractionDigits: decimals, useGrouping: 'min2' }).format(value),
    count: (value) => countFormat.format(value),
    significant: (value, digits = 3) => cached(`s${digits}`, { maximumSignificantDigits: digits, useGrouping: 'min2' }).format(value),
    scientific: (value, decimals = 3) => cached(`e${decimals}`, { notation: 'scientific', minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(value),
  };
}
