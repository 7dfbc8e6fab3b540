import type { RequestHandler } from 'express';
import { hasNul } from '../../shared/schemas/common';
import { invalid } from '../errors';

// PostgreSQL text cannot hold a NUL byte and no form ever sends one, so any string that does is
// refused up front with a 400 naming where it was. The shared `str()`/`text()` schemas refuse it
// too; this guard covers what no schema reads (paths, query strings, multipart fields).

/** The dotted path of the first string containing NUL in `value` (keys included), or null. */
export function findNul(value: unknown, at = '', depth = 0): string | null {
  if (typeof value === 'string') return hasNul(value) ? at || '_' : null;
  if (depth > 32 || value === null || typeof value !== 'object') return null;
  for (const [key, inner] of Object.entries(value)) {
    const here = at ? `${at}.${key}` : key;
    if (hasNul(key)) return here;
    const found = findNul(inner, here, depth + 1);
    if (found) return found;
  }
  return null;
}

const nulError = (where: string, name: string) =>
  invalid(`The ${where} contains a NUL character (\\u0000), which cannot be stored`, { [name]: 'Remove the NUL character' });

/** App-wide: the path, the query string and a JSON or form body. */
export const refuseNul: RequestHandler = (req, _res, next) => {
  if (/%00/.test(req.originalUrl.split('?')[0]) || hasNul(req.path)) return next(nulError('address', '_'));
  const inQuery = findNul(req.query);
  if (inQuery) return next(nulError('query string', inQuery));
  const inBody = findNul(req.body);
  if (inBody) return next(nulError('request body', inBody));
  return next();
};

/** Per route, after its parsers ran: path parameters and multipart text fields. */
export const refuseNulInParsed: RequestHandler = (req, _res, next) => {
  const found = findNul(req.params) ?? findNul(req.body);
  return found ? next(nulError('request', found)) : next();
};
