// Every rate limit in one place. Counts live in PostgreSQL (rate-limit-store.ts), so all server
// instances share them. Client addresses come from req.ip, which honours X-Forwarded-For only from
// the proxies named in TRUST_PROXY (none by default), so a client cannot rotate its own address.
import { createHash } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import rateLimit, { ipKeyGenerator } from 'express-rate-limit';
import type { Knex } from 'knex';
import type { SessionUser } from '../../shared/roles';
import type { Config } from '../config';
import { DomainError } from '../errors';
import { PostgresRateLimitStore } from './rate-limit-store';

const MINUTE = 60_000;

/** The client's address (an IPv6 client counts per /56, as express-rate-limit advises). */
export const clientAddress = (req: Request) => ipKeyGenerator(req.ip ?? '');

/** An e-mail as a fixed-length key: no address stored in the counters table, and no odd bytes in a key. */
export const emailKey = (email: unknown) => createHash('sha256').update(String(email ?? '').trim().toLowerCase()).digest('hex');

interface LimitSpec {
  prefix: string;
  windowMinutes: number;
  limit: number;
  key: (req: Request) => string;
  /** Count only failed requests (status ≥ 400). */
  failuresOnly?: boolean;
  message: string;
  /** Answer differently from the JSON 429 (the public HTML page). */
  handler?: RequestHandler;
}

export function makeLimiter(knex: Knex, spec: LimitSpec): RequestHandler {
  return rateLimit({
    windowMs: spec.windowMinutes * MINUTE,
    limit: spec.limit,
    skipSuccessfulRequests: spec.failuresOnly ?? false,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new PostgresRateLimitStore(knex, spec.prefix),
    keyGenerator: spec.key,
    handler: spec.handler ?? ((_req, _res, next) => next(new DomainError(429, 'rate_limited', spec.message))),
  });
}

export interface AuthLimiters {
  /** Failed sign-ins per account (the e-mail typed), from any address, then per address, any e-mail. */
  login: RequestHandler[];
  register: RequestHandler[];
  passwordChange: RequestHandler[];
  /** "Forgot password" requests per address and per e-mail typed (so nobody's inbox can be flooded). */
  passwordReset: RequestHandler[];
  /** Unknown, used or expired reset links, and refused new passwords, per address. */
  passwordResetConfirm: RequestHandler[];
}

export function authLimiters(knex: Knex, config: Config): AuthLimiters {
  const signIn = 'Too many failed sign-in attempts: wait a few minutes and try again';
  return {
    login: [
      makeLimiter(knex, {
        prefix: 'login-account:', windowMinutes: config.LOGIN_WINDOW_MINUTES, limit: config.LOGIN_MAX_FAILURES,
        key: (req) => emailKey(req.body?.email), failuresOnly: true, message: signIn,
      }),
      makeLimiter(knex, {
        prefix: 'login-address:', windowMinutes: config.LOGIN_WINDOW_MINUTES, limit: config.LOGIN_ADDRESS_MAX_FAILURES,
        key: clientAddress, failuresOnly: true, message: signIn,
      }),
    ],
    register: [
      makeLimiter(knex, {
        prefix: 'register-address:', windowMinutes: config.REGISTER_WINDOW_MINUTES, limit: config.REGISTER_MAX_PER_ADDRESS,
        key: clientAddress, message: 'Too many accounts registered from here: wait a while and try again',
      }),
    ],
    passwordChange: [
      makeLimiter(knex, {
        prefix: 'password-change:', windowMinutes: config.PASSWORD_CHANGE_WINDOW_MINUTES, limit: config.PASSWORD_CHANGE_MAX_FAILURES,
        key: (req) => String((req.user as SessionUser | undefined)?.id ?? clientAddress(req)), failuresOnly: true,
        message: 'Too many attempts to change the password: wait a few minutes and try again',
      }),
    ],
    passwordReset: [
      makeLimiter(knex, {
        prefix: 'reset-address:', windowMinutes: config.PASSWORD_RESET_WINDOW_MINUTES, limit: config.PASSWORD_RESET_MAX_PER_ADDRESS,
        key: clientAddress, message: 'Too many password reset requests from here: wait a while and try again',
      }),
      makeLimiter(knex, {
        prefix: 'reset-account:', windowMinutes: config.PASSWORD_RESET_WINDOW_MINUTES, limit: config.PASSWORD_RESET_MAX_PER_ACCOUNT,
        key: (req) => emailKey(req.body?.email), message: 'Too many password reset requests for this address: wait a while and look for the mails already sent',
      }),
    ],
    passwordResetConfirm: [
      makeLimiter(knex, {
        prefix: 'reset-confirm:', windowMinutes: config.PASSWORD_RESET_WINDOW_MINUTES, limit: config.PASSWORD_RESET_CONFIRM_MAX_FAILURES,
        key: clientAddress, failuresOnly: true, message: 'Too many tries with reset links from here: wait a while and try again',
      }),
    ],
  };
}

/** The public unit check: every request per minute, and misses (unknown serial, wrong code) per day. */
export function verifyLimiters(knex: Knex, config: Config, tooMany: RequestHandler): RequestHandler[] {
  const common = { key: clientAddress, message: 'Too many checks', handler: tooMany };
  return [
    makeLimiter(knex, { ...common, prefix: 'verify:', windowMinutes: 1, limit: config.VERIFY_MAX_PER_MINUTE }),
    makeLimiter(knex, { ...common, prefix: 'verify-miss:', windowMinutes: 24 * 60, limit: config.VERIFY_MAX_MISSES_PER_DAY, failuresOnly: true }),
  ];
}
