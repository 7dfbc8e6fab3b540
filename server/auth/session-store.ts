// The PostgreSQL session store, with the expiry written at most once a minute. Sessions roll
// (each request moves the expiry a week ahead), and connect-pg-simple would UPDATE the row on
// every request for that. Here the read remembers the expiry as stored, and touch() writes only
// when the new one is at least TOUCH_INTERVAL_MS later; the UPDATE repeats the check, so several
// processes sharing the table still write at most once a minute. A week's session loses at most
// a minute of its life.
//
// The same read also fetches the signed-in account's row (active accounts only), so a signed-in
// request costs one query before its handler instead of two; passport's deserializeUser takes it
// from `userLoadedWithSession` (server/auth/session.ts). It is read on every request as before, so
// deactivation and role changes still act at once. Both statements are named, so each pooled
// connection parses them once (as server/db/prepared.ts does for knex's queries).
//
// The read also returns the data version (server/db/data-version.ts), taken before the request
// reads any data, which keys the response cache (server/http/response-cache.ts).
import connectPgSimple from 'connect-pg-simple';
import session, { type SessionData } from 'express-session';
import type pg from 'pg';
import type { SessionUser } from '../../shared/roles';
import { toSessionUser, type UserRow } from '../services/users';

const PgStore = connectPgSimple(session);
export const TOUCH_INTERVAL_MS = 60_000;

// The expiry each loaded session had in the table, keyed by the session object express-session
// builds from it and later hands to touch(). Weak, so finished requests leave nothing behind.
const storedExpiry = new WeakMap<object, number>();
const STORED = Symbol('stored expiry');
const USER = Symbol('account read with the session');
type Loaded = SessionData & { [STORED]?: number; [USER]?: SessionUser | null; [VERSION]?: number };
// The account read with each loaded session (null: the session names no active account).
const loadedUsers = new WeakMap<object, SessionUser | null>();
const VERSION = Symbol('data version read with the session');
const loadedVersions = new WeakMap<object, number>();

/**
 * The account row read together with this request's session: a SessionUser, null when the session
 * names no active account (deactivated, or signed out), undefined when the session did not come from
 * the store in this request (then the caller reads the account itself).
 */
export const userLoadedWithSession = (sess: object | undefined): SessionUser | null | undefined => (sess ? loadedUsers.get(sess) : undefined);

/** The data version read together with this request's session; undefined when the session did not come from the store. */
export const dataVersionLoadedWithSession = (sess: object | undefined): number | undefined => (sess ? loadedVersions.get(sess) : undefined);

// The account id in a stored session, as text; only plain integers are looked up.
const SESSION_USER_ID = `CASE WHEN s.sess->'passport'->>'user' ~ '^[0-9]{1,9}$' THEN (s.sess->'passport'->>'user')::int END`;

const expiryOf = (sess: SessionData) => (sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : Date.now());

export class ThrottledPgStore extends PgStore {
  constructor(private readonly pool: pg.Pool) {
    super({ pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: false });
  }

  override get(sid: string, callback: (err: unknown, session?: SessionData | null) => void): void {
    // "expire" is a timestamp without zone, written through to_timestamp(): read it back through the
    // same zone in SQL, as epoch milliseconds, so the comparison never depends on Node's zone.
    const sql = `SELECT s.sess, extract(epoch FROM s.expire::timestamptz)::float8 * 1000 AS expire_ms, to_jsonb(u) - 'password_hash' AS account,
        (SELECT n FROM data_version)::float8 AS data_version
      FROM "session" s LEFT JOIN users u ON u.active AND u.id = ${SESSION_USER_ID}
      WHERE s.sid = $1 AND s.expire >= now()`;
    this.pool.query<{ sess: Loaded; expire_ms: number; account: UserRow | null; data_version: number }>({ name: 'kp_session_read', text: sql, values: [sid] }).then(
      ({ rows: [row] }) => {
        if (!row) return callback(null, null);
        const sess = typeof row.sess === 'string' ? (JSON.parse(row.sess) as Loaded) : row.sess;
        sess[STORED] = row.expire_ms;
        sess[USER] = row.account ? toSessionUser(row.account) : null;
        sess[VERSION] = row.data_version;
        callback(null, sess);
      },
      (error: unknown) => callback(error),
    );
  }

  override createSession(req: Parameters<session.Store['createSession']>[0], sess: Loaded) {
    const stored = sess[STORED];
    const user = sess[USER];
    const version = sess[VERSION];
    const created = super.createSession(req, sess);
    if (stored !== undefined) storedExpiry.set(created, stored);
    if (user !== undefined) loadedUsers.set(created, user);
    if (version !== undefined) loadedVersions.set(created, version);
    return created;
  }

  override touch(sid: string, sess: SessionData, callback?: (err?: unknown) => void): void {
    const expires = expiryOf(sess);
    const stored = storedExpiry.get(sess);
    if (stored !== undefined && expires - stored < TOUCH_INTERVAL_MS) {
      callback?.();
      return;
    }
    this.pool.query({
      name: 'kp_session_touch',
      text: `UPDATE "session" SET expire = to_timestamp($1 / 1000.0) WHERE sid = $2 AND expire < to_timestamp($1 / 1000.0) - make_interval(secs => $3)`,
      values: [expires, sid, TOUCH_INTERVAL_MS / 1000],
    }).then(
      () => {
        storedExpiry.set(sess, expires);
        callback?.();
      },
      (error: unknown) => callback?.(error),
    );
  }
}
