import { z } from 'zod';
import { str } from './common';

// The one request shape and the one response shape of every list endpoint. Paging, sorting and
// filtering happen on the server; clients send these as query parameters and show what comes back.

/** No page holds more rows than this, whatever a client asks for. */
export const PAGE_SIZE_MAX = 100;
export const SORT_DIRECTIONS = ['asc', 'desc'] as const;
export type SortDirection = (typeof SORT_DIRECTIONS)[number];

/**
 * Counting stops here: a list's count reads at most this many rows, so its cost stays bounded
 * however long the shop's history grows. Past it, `total` is this number and `totalCapped` is true
 * ("1000+ orders"); searching and filtering narrow a list back under it. A thousand is 40 pages of
 * 25, more than anyone pages through, and counting it costs about as much as reading one page.
 */
export const COUNT_CAP = 1_000;

/** One page of a list: the rows, how many match in all (or COUNT_CAP+, see totalCapped), and which page this is. */
export interface Page<T> {
  items: T[];
  total: number;
  /** True when more than COUNT_CAP rows match and `total` is COUNT_CAP. */
  totalCapped: boolean;
  page: number;
  pageSize: number;
}

export interface ListParams<S extends string = string> {
  page: number;
  pageSize: number;
  sort: S;
  dir: SortDirection;
  q?: string;
}

/**
 * A list endpoint's query schema: page (1…), pageSize (1…100), sort (one of the endpoint's own
 * keys), dir, a free-text q, plus the endpoint's filters. Unknown parameters are refused (400),
 * so a misspelt filter never silently returns everything.
 */
export function listQuery<S extends readonly [string, ...string[]], F extends z.ZodRawShape = Record<never, never>>(
  sortKeys: S,
  defaults: { sort: S[number]; dir: SortDirection; pageSize?: number },
  filters: F = {} as F,
) {
  return z.object({
    page: z.coerce.number({ message: 'page must be a whole number' }).int('page must be a whole number').min(1, 'page starts at 1').max(1_000_000, 'page is too large').default(1),
    pageSize: z.coerce.number({ message: 'pageSize must be a whole number' }).int('pageSize must be a whole number').min(1, 'pageSize is at least 1')
      .max(PAGE_SIZE_MAX, `pageSize is at most ${PAGE_SIZE_MAX}`).default(defaults.pageSize ?? 25),
    sort: z.enum(sortKeys, { message: `sort by one of: ${sortKeys.join(', ')}` }).default(defaults.sort as never),
    dir: z.enum(SORT_DIRECTIONS, { message: 'dir is asc or desc' }).default(defaults.dir),
    q: str().trim().max(100, 'q is at most 100 characters').optional(),
    ...filters,
  }).strict();
}

/** A yes/no filter in a query string: "true" or "false". */
export const boolParam = z.enum(['true', 'false'], { message: 'use true or false' }).transform((v) => v === 'true');

/** Query-string parameters for a list request (omits defaults the server applies anyway). */
export function listSearch(params: Partial<ListParams> & Record<string, string | number | boolean | undefined | null>): string {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) {
    if (value === undefined || value === null || value === '') continue;
    search.set(key, String(value));
  }
  const s = search.toString();
  return s ? `?${s}` : '';
}
