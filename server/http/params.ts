import type { Request } from 'express';
import { parseId } from '../../shared/schemas/common';
import { serialParamSchema } from '../../shared/schemas/spec-sheets';
import { invalid, notFound } from '../errors';

// Path and query parameters, parsed the one way. A path parameter that cannot name a row
// (`0`, `-1`, `1e308`, `12abc`, above 2³¹−1) names nothing, so it answers 404 exactly like a
// well-formed id with no row behind it; a query parameter is input to check, so it answers 400.

/** The id in path parameter `name` (default `id`), or 404 "No such <what>". */
export function pathId(req: Request, name = 'id', what = 'record'): number {
  const id = parseId(req.params[name]);
  if (id === null) throw notFound(`No such ${what}`);
  return id;
}

/** A unit serial from the path (bounded length, letters, digits and dashes), or 404. */
export function pathSerial(req: Request, name = 'serial'): string {
  const parsed = serialParamSchema.safeParse(req.params[name]);
  if (!parsed.success) throw notFound('No such unit');
  return parsed.data;
}

/** An optional id in query parameter `name`: undefined when absent, 400 naming it when malformed. */
export function queryId(req: Request, name: string): number | undefined {
  const raw = req.query[name];
  if (raw === undefined || raw === '') return undefined;
  const id = parseId(raw);
  if (id === null) throw invalid(`The ${name} must be a whole number from 1 to 2147483647`, { [name]: 'Not a valid id' });
  return id;
}
