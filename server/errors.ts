import type { ErrorRequestHandler } from 'express';
import type { ZodType } from 'zod';

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

/** The single JSON error shape; no stack trace or database message ever reaches a client. */
export const errorMiddleware: ErrorRequestHandler = (error, _req, res, next) => {
  void next;
  if (error instanceof DomainError) {
    res.status(error.status).json({ error: { code: error.code, message: error.message, fields: error.fields } });
    return;
  }
  // Body-parser and multer failures carry a status of their own.
  const status = (error as { status?: number; statusCode?: number }).status ?? (error as { statusCode?: number }).statusCode;
  const type = (error as { type?: string }).type;
  if (type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'bad_json', message: 'The request body is not valid JSON' } });
    return;
  }
  if (status === 413 || type === 'entity.too.large' || (error as { code?: string }).code === 'LIMIT_FILE_SIZE') {
    res.status(413).json({ error: { code: 'too_large', message: 'The upload or request body is too large' } });
    return;
  }
  if (status && status >= 400 && status < 500) {
    res.status(status).json({ error: { code: 'bad_request', message: 'The request could not be read' } });
    return;
  }
  console.error(error);
  res.status(500).json({ error: { code: 'internal', message: 'Something went wrong on our side' } });
};
