import type { Request, RequestHandler } from 'express';
import type { createPassport } from '../auth/session';
import type { Knex } from 'knex';
import type { SessionUser } from '../../shared/roles';
import { changePasswordSchema, loginSchema, registerSchema } from '../../shared/schemas/auth';
import { csrfToken } from '../auth/csrf';
import { parseWith, unauthorized } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import * as users from '../services/users';

function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (error) => (error ? reject(error) : resolve())));
}

// The one message for every failed sign-in, so nobody can learn which e-mails have accounts.
const BAD_SIGN_IN = 'That e-mail and password do not match an active account';

export function authRoutes(knex: Knex, passport: ReturnType<typeof createPassport>, loginLimiter: RequestHandler): RouteDef[] {
  return [
    { method: 'get', path: '/api/auth/csrf', allow: 'public', handler: (req, res) => res.json({ csrfToken: csrfToken(req) }) },
    {
      method: 'post', path: '/api/auth/login', allow: 'public', before: [loginLimiter],
      handler: async (req, res) => {
        req.body = parseWith(loginSchema, req.body);
        const user = await new Promise<SessionUser | false>((resolve, reject) => {
          passport.authenticate('local', { session: false }, (error: unknown, found: SessionUser | false) =>
            error ? reject(error) : resolve(found),
          )(req, res, reject);
        });
        if (!user) throw unauthorized(BAD_SIGN_IN);
        await logIn(req, user);
        res.json({ user, csrfToken: csrfToken(req) });
      },
    },
    {
      method: 'post', path: '/api/auth/logout', allow: 'public',
      handler: async (req, res) => {
        await new Promise<void>((resolve, reject) => req.logout((error) => (error ? reject(error) : resolve())));
        res.status(204).end();
      },
    },
    { method: 'get', path: '/api/auth/me', allow: 'signed-in', handler: (req, res) => res.json({ user: currentUser(req), csrfToken: csrfToken(req) }) },
    {
      method: 'post', path: '/api/auth/register', allow: 'public',
      handler: async (req, res) => {
        const user = await users.registerCustomer(knex, parseWith(registerSchema, req.body));
        await logIn(req, user);
        res.status(201).json({ user, csrfToken: csrfToken(req) });
      },
    },
    {
      method: 'post', path: '/api/auth/password', allow: 'signed-in',
      handler: async (req, res) => {
        const input = parseWith(changePasswordSchema, req.body);
        await users.changePassword(knex, currentUser(req).id, input.currentPassword, input.newPassword);
        res.status(204).end();
      },
    },
  ];
}
