import { randomUUID } from 'node:crypto';
import type { ErrorRequestHandler, Request, RequestHandler, Response } from 'express';
import type { ZodType } from 'zod';
import { translatePgError } from './db/pg-errors';

/** A failure the client can act on; `code` is stable, `status` is the HTTP status. */
export class DomainError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

export const notFound = (what = 'Not found') => new DomainError(404, 'not_found', what);
export const conflict = (message: string) => new DomainError(409, 'conflict', message);
export const forbidden = (message = 'You do not have access to this') => new DomainError(403, 'forbidden', message);
export const unauthorized = (message = 'Sign in first') => new DomainError(401, 'unauthorized', message);
export const invalid = (message: string, fields?: Record<string, string>) =>
  new DomainError(400, 'validation', message, fields);
export const tooLarge = (message: string) => new DomainError(413, 'too_large', message);
export const unsupportedMedia = (message: string, fields?: Record<string, string>) => new DomainError(415, 'unsupported_media', message, fields);

/** Parses a request body with a shared zod schema, or throws a 400 with one message per field. */
export function parseWith<T>(schema: ZodType<T>, value: unknown): T {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const fields: Record<string, string> = {};
  for (const issue of result.error.issues) {
    const key = issue.path.join('.') || '_';
    fields[key] ??= issue.message;
  }
  throw invalid('Some fields need attention', fields);
}

/** PostgreSQL error codes we translate instead of leaking (unique and check violations). */
export function isUniqueViolation(error: unknown): boolean {
  return typeof error === 'object' && error !== null && (error as { code?: string }).code === '23505';
}

const send = (res: Response, error: DomainError) => {
  if (error.status === 503) res.set('Retry-After', '2');
  res.status(error.status).json({ error: { code: error.code, message: error.message, fields: error.fields } });
};

/** One log line for a true 500: the request id, the route and the error's kind, never SQL, parameters or a stack. */
function logInternal(req: Request, error: unknown) {
  const e = error as { name?: string; code?: unknown; message?: unknown };
  // Knex prefixes a database error's message with the statement and its values: keep only PostgreSQL's own words.
  const message = String(e?.message ?? error).split(' - ').pop()!.split('\n')[0].slice(0, 200);
  console.error(`[500] request ${requestIdOf(req)} ${req.method} ${req.path}: ${e?.name ?? 'Error'}${typeof e?.code === 'string' ? ` ${e.code}` : ''}: ${message}`);
}

/** The single JSON error shape; no stack trace or database message ever reaches a client. */
export const errorMiddleware: ErrorRequestHandler = (error, req, res, next) => {
  void next;
  if (error instanceof DomainError) return send(res, error);
  const translated = translatePgError(error);
  if (translated) return send(res, translated);
  // A full connection pool is "busy", not broken.
  if ((error as { name?: string }).name === 'KnexTimeoutError') return send(res, new DomainError(503, 'unavailable', 'The shop is busy: try again in a moment'));
  // Body-parser and multer failures carry a status of their own.
  const status = (error as { status?: number; statusCode?: number }).status ?? (error as { statusCode?: number }).statusCode;
  const type = (error as { type?: string }).type;
  if (type === 'entity.parse.failed') return send(res, new DomainError(400, 'bad_json', 'The request body is not valid JSON'));
  if (status === 413 || type === 'entity.too.large' || (error as { code?: string }).code === 'LIMIT_FILE_SIZE') {
    return send(res, new DomainError(413, 'too_large', 'The upload or request body is too large'));
  }
  if (status && status >= 400 && status < 500) return send(res, new DomainError(status, 'bad_request', 'The request could not be read'));
  logInternal(req, error);
  res.status(500).json({ error: { code: 'internal', message: `Something went wrong on our side (request ${requestIdOf(req)})` } });
};

/** Gives every request an id (the X-Request-Id answer header) that a 500's log line and message share. */
export const requestId: RequestHandler = (_req, res, next) => {
  const id = randomUUID();
  res.locals.requestId = id;
  res.set('X-Request-Id', id);
  next();
};
const requestIdOf = (req: Request) => String(req.res?.locals.requestId ?? '-');
