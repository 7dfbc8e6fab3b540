import express from 'express';
import helmet from 'helmet';
import path from 'node:path';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import type { Knex } from 'knex';
import type { Config } from './config';
import { csrfProtection } from './auth/csrf';
import { authLimiters } from './auth/limits';
import { createPassport, sessionMiddleware } from './auth/session';
import { DomainError, errorMiddleware, requestId } from './errors';
import { compressResponses } from './http/compression';
import { refuseNul } from './http/input-guard';
import { buildRouter, type RouteDef, type RouteRegistry } from './http/route-table';
import { ResponseCache } from './http/response-cache';
import { clientFiles } from './http/static-files';
import { authRoutes } from './routes/auth';
import { healthRoutes } from './routes/health';
import { settingsRoutes } from './routes/settings';
import { designRoutes } from './routes/designs';
import { profileRoutes } from './routes/profiles';
import { userRoutes } from './routes/users';
import { assemblerRoutes } from './routes/assemblers';
import { batchRoutes } from './routes/batches';
import { boardRoutes } from './routes/board';
import { shipmentRoutes } from './routes/shipments';
import { trayRoutes } from './routes/trays';
import { unitRoutes } from './routes/units';
import { mailRoutes } from './routes/mail';
import { orderRoutes } from './routes/orders';
import { paymentRoutes } from './routes/payments';
import { shopRoutes } from './routes/shop';
import { modelRoutes } from './routes/models';
import { partRoutes } from './routes/parts';
import { deviceRoutes } from './routes/devices';
import { specSheetRoutes } from './routes/spec-sheets';
import { closeComputePool, configureComputePool } from './compute/pool';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

export interface AppDeps {
  knex: Knex;
  config: Config;
}

/** Paths that prove themselves another way (a provider's signature) and so skip the CSRF check. */
export const CSRF_EXEMPT = ['/api/payments/webhook'];

declare module 'http' {
  interface IncomingMessage {
    rawBody?: Buffer;
  }
}

/** Builds the whole product's Express app; `close` releases what it opened. */
export function createApp({ knex, config }: AppDeps) {
  const app = express();
  const registry: RouteRegistry = { routes: [] };
  const sessionPool = new pg.Pool({ connectionString: config.DATABASE_URL, max: 5 });
  configureComputePool(config.COMPUTE_THREADS);

  app.disable('x-powered-by');
  // Only the proxies named in TRUST_PROXY may say who the client is (req.ip, req.secure).
  app.set('trust proxy', config.trustProxy);
  app.use(requestId);
  app.use(helmet());
  app.use(compressResponses());
  // Webhooks are verified against the exact bytes received, so keep them.
  app.use(express.json({ limit: '1mb', verify: (req, _res, buf) => { req.rawBody = buf; } }));
  app.use(refuseNul);
  app.use(sessionMiddleware(sessionPool, config));
  const passport = createPassport(knex);
  app.use(passport.initialize());
  app.use(passport.session());
  app.use('/api', csrfProtection(CSRF_EXEMPT.map((p) => p.replace(/^\/api/, ''))));

  const routes: RouteDef[] = [
    ...healthRoutes(knex),
    ...authRoutes(knex, config, passport, authLimiters(knex, config)),
    ...userRoutes(knex),
    ...settingsRoutes(knex),
    ...profileRoutes(knex, config),
    ...designRoutes(),
    ...shopRoutes(knex),
    ...orderRoutes(knex, config),
    ...paymentRoutes(knex, config),
    ...mailRoutes(config),
    ...modelRoutes(knex),
    ...partRoutes(knex),
    ...deviceRoutes(knex),
    ...batchRoutes(knex, config),
    ...assemblerRoutes(knex),
    ...unitRoutes(knex, config),
    ...trayRoutes(knex),
    ...shipmentRoutes(knex, config),
    ...boardRoutes(knex),
    ...specSheetRoutes(knex, config),
  ];
  app.use(buildRouter(routes, registry, config.RESPONSE_CACHE === 'true' ? new ResponseCache() : undefined));
  app.use('/api', (_req, _res, next) => next(new DomainError(404, 'not_found', 'No such API route')));

  const dist = path.join(root, 'dist');
  if (existsSync(dist)) app.use(clientFiles(dist));
  app.use(errorMiddleware);

  return { app, registry, close: () => Promise.all([sessionPool.end(), closeComputePool()]).then(() => undefined) };
}
