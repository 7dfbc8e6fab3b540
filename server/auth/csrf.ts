import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { DomainError } from '../errors';

// Synchronizer-token CSRF defence for a JSON API on cookie sessions: the token lives in the
// server-side session and must come back in the X-CSRF-Token header on every unsafe request.
// A cross-site form cannot set that header, and a cross-site script cannot read the token.
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);
export const CSRF_HEADER = 'x-csrf-token';

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string;
  }
}

/** The session's token, created on first use. */
export function csrfToken(req: Request): string {
  if (!req.session.csrfToken) req.session.csrfToken = randomBytes(24).toString('base64url');
  return req.session.csrfToken;
}

function matches(expected: string | undefined, given: string | undefined): boolean {
  if (!expected || !given) return false;
  const a = Buffer.from(expected);
  const b = Buffer.from(given);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** Rejects unsafe requests without the session's token; `exempt` paths verify a signature of their own. */
export function csrfProtection(exempt: string[]): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method) || exempt.includes(req.path)) return next();
    if (!matches(req.session?.csrfToken, req.get(CSRF_HEADER))) {
      return next(new DomainError(403, 'csrf', 'Missing or wrong CSRF token: fetch one from GET /api/auth/csrf'));
    }
    next();
  };
}
