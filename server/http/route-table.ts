import { Router, type Request, type RequestHandler, type Response } from 'express';
import { STAFF, type Role, type SessionUser } from '../../shared/roles';
import { forbidden, unauthorized } from '../errors';
import { refuseNulInParsed } from './input-guard';
import { serveCached, type ResponseCache } from './response-cache';

/** Who may call a route: anyone, any signed-in user, or the listed roles. */
export type Allow = 'public' | 'signed-in' | readonly Role[];
export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteDef {
  method: Method;
  path: string;
  allow: Allow;
  /** Middleware that runs after the guard (rate limits, upload parsers). */
  before?: RequestHandler[];
  /**
   * A GET whose JSON depends only on the database, the person and the URL: the web process may send
   * it again from memory until any write commits (server/http/response-cache.ts).
   */
  cache?: true;
  handler: (req: Request, res: Response) => unknown;
}

/** Every route the app mounts, for the authorization matrix test. */
export interface RouteRegistry {
  routes: RouteDef[];
}

export function currentUser(req: Request): SessionUser {
  const user = req.user as SessionUser | undefined;
  if (!user) throw unauthorized();
  return user;
}

/** Staff see unpublished models, costs and stock; everyone else (anonymous, customers) the public view. */
export function isStaffRequest(req: Request): boolean {
  const user = req.user as SessionUser | undefined;
  return !!user && STAFF.includes(user.role);
}

function guard(allow: Allow, req: Request) {
  if (allow === 'public') return;
  const user = req.user as SessionUser | undefined;
  if (!user) throw unauthorized();
  if (allow === 'signed-in') return;
  if (!allow.includes(user.role)) throw forbidden();
}

/** Builds an Express router from a flat table of routes, each behind its guard. */
export function buildRouter(routes: RouteDef[], registry: RouteRegistry, cache?: ResponseCache): Router {
  const router = Router();
  const cached = cache ? [serveCached(cache)] : [];
  for (const route of routes) {
    if (route.cache && route.method !== 'get') throw new Error(`${route.method} ${route.path}: only a GET can be cached`);
    registry.routes.push(route);
    const check: RequestHandler = (req, _res, next) => {
      guard(route.allow, req);
      next();
    };
    router[route.method](route.path, check, ...(route.before ?? []), refuseNulInParsed, ...(route.cache ? cached : []), async (req, res) => {
      await route.handler(req, res);
    });
  }
  return router;
}
