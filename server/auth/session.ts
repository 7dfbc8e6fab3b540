import type { IncomingMessage } from 'node:http';
import session from 'express-session';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type pg from 'pg';
import type { Knex } from 'knex';
import type { SessionUser } from '../../shared/roles';
import type { Config } from '../config';
import { authenticate, findActiveUser } from '../services/users';
import { ThrottledPgStore, userLoadedWithSession } from './session-store';

const WEEK_MS = 7 * 24 * 3600 * 1000;

/**
 * Cookie sessions stored in PostgreSQL (table "session", made by a migration). They roll: each
 * request moves the expiry a week ahead, written to the table at most once a minute.
 */
export function sessionMiddleware(pool: pg.Pool, config: Config) {
  return session({
    name: 'kneepoint.sid',
    secret: config.SESSION_SECRET,
    store: new ThrottledPgStore(pool),
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.cookieSecure, maxAge: WEEK_MS },
  });
}

/** A passport instance of our own (not the global one), so two apps in one test process never share state. */
export function createPassport(knex: Knex) {
  const instance = new passport.Passport();
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      authenticate(knex, email.trim().toLowerCase(), password).then(
        (user) => done(null, user ?? false),
        (error) => done(error),
      );
    }),
  );
  instance.serializeUser((user, done) => done(null, (user as SessionUser).id));
  // The session store read the account with the session (one query); a session made in this
  // request (just signed in) has none, so it is read here.
  instance.deserializeUser<number, IncomingMessage>((req, id, done) => {
    const loaded = userLoadedWithSession((req as IncomingMessage & { session?: object }).session);
    if (loaded === null || (loaded && loaded.id === id)) {
      done(null, loaded ?? false);
      return;
    }
    findActiveUser(knex, id).then(
      (user) => done(null, user ?? false),
      (error) => done(error),
    );
  });
  return instance;
}
