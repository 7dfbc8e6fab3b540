import { z } from 'zod';

// The building blocks every request schema uses, so a rule about ids, dates or text lives here
// once: the forms, the server's body parsing and the path-parameter helper all call these.

/** Ids are PostgreSQL `integer` columns: 1 … 2³¹−1. */
export const ID_MAX = 2_147_483_647;

/**
 * A positive id from a path, query or body value, or null. Strings must be plain decimal digits
 * without a leading zero (so `1e308`, `12abc`, `0x10`, `1.5`, `-1` and 20-digit numbers are refused
 * before anything reaches the database); numbers must be whole and in range.
 */
export function parseId(value: unknown): number | null {
  if (typeof value === 'number') return Number.isInteger(value) && value >= 1 && value <= ID_MAX ? value : null;
  if (typeof value !== 'string' || !/^[1-9][0-9]{0,9}$/.test(value)) return null;
  const id = Number(value);
  return id <= ID_MAX ? id : null;
}

/** A zod id with the message a form shows ("Choose a part"); the same bound as `parseId`. */
export const id = (message = 'Not a valid id') =>
  z.union([z.number(), z.string()], { error: message }).transform((value, ctx) => {
    const parsed = parseId(value);
    if (parsed === null) {
      ctx.addIssue({ code: 'custom', message });
      return z.NEVER;
    }
    return parsed;
  });
export const idSchema = id();

const NUL = '\u0000';
export const hasNul = (s: string) => s.includes(NUL);

/** Every request string: PostgreSQL text cannot hold a NUL byte, so it is refused here with a field message. */
export const str = () => z.string().refine((s) => !hasNul(s), 'Remove the NUL character (\\u0000)');

/** Trimmed free text of at most `max` characters. */
export const text = (max: number) => str().trim().max(max, `Use at most ${max} characters`);

/** Four-digit years only: PostgreSQL and JavaScript agree on every day in this range. */
export const DATE_MIN_YEAR = 1970;
export const DATE_MAX_YEAR = 9999;

/** True when `value` is YYYY-MM-DD and that day exists (2026-02-31 and 2026-13-45 do not). */
export function isCalendarDate(value: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  if (!m) return false;
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (year < DATE_MIN_YEAR || year > DATE_MAX_YEAR || month < 1 || month > 12 || day < 1) return false;
  return day <= new Date(Date.UTC(year, month, 0)).getUTCDate();
}

/** A calendar date as YYYY-MM-DD, checked against the calendar (not only the pattern). */
export const dateSchema = (example = '2026-12-07') =>
  z.string({ error: `Use a date like ${example}` }).refine(isCalendarDate, {
    error: (issue) => (/^\d{4}-\d{2}-\d{2}$/.test(String(issue.input))
      ? `${String(issue.input)} is not a day in the calendar (${DATE_MIN_YEAR}–${DATE_MAX_YEAR})`
      : `Use a date like ${example}`),
  });
