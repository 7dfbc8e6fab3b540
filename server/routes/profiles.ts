import rateLimit from 'express-rate-limit';
import type { Knex } from 'knex';
import { PostgresRateLimitStore } from '../auth/rate-limit-store';
import type { Config } from '../config';
import { DomainError } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import { requestProfile } from '../services/engine/profiles';

type ProfileConfig = Pick<Config, 'PROFILE_RATE_LIMIT' | 'PROFILE_RATE_WINDOW_SECONDS' | 'PROFILE_MAX_COST'>;

/**
 * The engine over HTTP, for any signed-in account: it is the same public engine the storefront
 * runs in every visitor's browser, so it guards no data, only CPU, and that is bounded here (a
 * per-account limit counted in PostgreSQL, a cost cap per request) and by the compute pool's queue.
 */
export function profileRoutes(knex: Knex, config: ProfileConfig): RouteDef[] {
  const limiter = rateLimit({
    windowMs: config.PROFILE_RATE_WINDOW_SECONDS * 1000,
    limit: config.PROFILE_RATE_LIMIT,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new PostgresRateLimitStore(knex, 'profiles:'),
    // Per account, whatever address it comes from (the guard has already required a session).
    keyGenerator: (req) => `user:${currentUser(req).id}`,
    handler: (_req, _res, next) => next(new DomainError(429, 'rate_limited',
      `At most ${config.PROFILE_RATE_LIMIT} profiles per ${config.PROFILE_RATE_WINDOW_SECONDS} s per account: wait a moment and try again`)),
  });
  return [
    {
      method: 'post', path: '/api/profiles', allow: 'signed-in', before: [limiter],
      handler: async (req, res) => res.json(await requestProfile(req.body, config.PROFILE_MAX_COST)),
    },
  ];
}
