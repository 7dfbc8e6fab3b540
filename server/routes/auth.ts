import type { Request } from 'express';
import type { createPassport } from '../auth/session';
import type { Knex } from 'knex';
import type { SessionUser } from '../../shared/roles';
import { changePasswordSchema, loginSchema, passwordResetConfirmSchema, passwordResetRequestSchema, registerSchema } from '../../shared/schemas/auth';
import { csrfToken } from '../auth/csrf';
import type { AuthLimiters } from '../auth/limits';
import { parseWith, unauthorized } from '../errors';
import { currentUser, type RouteDef } from '../http/route-table';
import type { Config } from '../config';
import { confirmPasswordReset, requestPasswordReset } from '../services/password-resets';
import * as users from '../services/users';

function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (error) => (error ? reject(error) : resolve())));
}

// The one message for every failed sign-in, so nobody can learn which e-mails have accounts.
const BAD_SIGN_IN = 'That e-mail and password do not match an active account';

// The one answer to every well-formed registration, whether or not the address has an account.
const REGISTERED = 'Thank you. We have sent a mail to that address; if you just made a new account, you can sign in now.';

// The one answer to every well-formed reset request, whether or not the address has an account.
export const RESET_REQUESTED = 'If that address belongs to an account, a mail with a link to set a new password is on its way. The link works once, for an hour.';

export function authRoutes(knex: Knex, config: Config, passport: ReturnType<typeof createPassport>, limits: AuthLimiters): RouteDef[] {
  return [
    { method: 'get', path: '/api/auth/csrf', allow: 'public', handler: (req, res) => res.json({ csrfToken: csrfToken(req) }) },
    {
      method: 'post', path: '/api/auth/login', allow: 'public', before: limits.login,
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
      // Never signs in and never says whether the address had an account: the client signs in next.
      method: 'post', path: '/api/auth/register', allow: 'public', before: limits.register,
      handler: async (req, res) => {
        await users.registerCustomer(knex, parseWith(registerSchema, req.body));
        res.status(202).json({ message: REGISTERED });
      },
    },
    {
      method: 'post', path: '/api/auth/password', allow: 'signed-in', before: limits.passwordChange,
      handler: async (req, res) => {
        const input = parseWith(changePasswordSchema, req.body);
        await users.changePassword(knex, currentUser(req).id, input, req.sessionID);
        res.status(204).end();
      },
    },
    {
      // Same answer for any address; the mail (only to an active account) carries a one-time link.
      method: 'post', path: '/api/auth/password-reset', allow: 'public', before: limits.passwordReset,
      handler: async (req, res) => {
        const { email } = parseWith(passwordResetRequestSchema, req.body);
        await requestPasswordReset(knex, config.publicUrl, email);
        res.status(202).json({ message: RESET_REQUESTED });
      },
    },
    {
      // Does not sign in: the person signs in next with the new password.
      method: 'post', path: '/api/auth/password-reset/confirm', allow: 'public', before: limits.passwordResetConfirm,
      handler: async (req, res) => {
        await confirmPasswordReset(knex, parseWith(passwordResetConfirmSchema, req.body), req.sessionID);
        res.status(204).end();
      },
    },
  ];
}
