// The PostgreSQL session store, with the expiry written at most once a minute. Sessions roll
// (each request moves the expiry a week ahead), and connect-pg-simple would UPDATE the row on
// every request for that. Here the read remembers the expiry as stored, and touch() writes only
// when the new one is at least TOUCH_INTERVAL_MS later; the UPDATE repeats the check, so several
// processes sharing the table still write at most once a minute. A week's session loses at most
// a minute of its life.
import connectPgSimple from 'connect-pg-simple';
import session, { type SessionData } from 'express-session';
import type pg from 'pg';

const PgStore = connectPgSimple(session);
export const TOUCH_INTERVAL_MS = 60_000;

// The expiry each loaded session had in the table, keyed by the session object express-session
// builds from it and later hands to touch(). Weak, so finished requests leave nothing behind.
const storedExpiry = new WeakMap<object, number>();
const STORED = Symbol('stored expiry');
type Loaded = SessionData & { [STORED]?: number };

const expiryOf = (sess: SessionData) => (sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : Date.now());

export class ThrottledPgStore extends PgStore {
  constructor(private readonly pool: pg.Pool) {
    super({ pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: false });
  }

  override get(sid: string, callback: (err: unknown, session?: SessionData | null) => void): void {
    // "expire" is a timestamp without zone, written through to_timestamp(): read it back through the
    // same zone in SQL, as epoch milliseconds, so the comparison never depends on Node's zone.
    const sql = `SELECT sess, extract(epoch FROM expire::timestamptz)::float8 * 1000 AS expire_ms FROM "session" WHERE sid = $1 AND expire >= now()`;
    this.pool.query<{ sess: Loaded; expire_ms: number }>(sql, [sid]).then(
      ({ rows: [row] }) => {
        if (!row) return callback(null, null);
        const sess = typeof row.sess === 'string' ? (JSON.parse(row.sess) as Loaded) : row.sess;
        sess[STORED] = row.expire_ms;
        callback(null, sess);
      },
      (error: unknown) => callback(error),
    );
  }

  override createSession(req: Parameters<session.Store['createSession']>[0], sess: Loaded) {
    const stored = sess[STORED];
    const created = super.createSession(req, sess);
    if (stored !== undefined) storedExpiry.set(created, stored);
    return created;
  }

  override touch(sid: string, sess: SessionData, callback?: (err?: unknown) => void): void {
    const expires = expiryOf(sess);
    const stored = storedExpiry.get(sess);
    if (stored !== undefined && expires - stored < TOUCH_INTERVAL_MS) {
      callback?.();
      return;
    }
    this.pool.query(
      `UPDATE "session" SET expire = to_timestamp($1 / 1000.0) WHERE sid = $2 AND expire < to_timestamp($1 / 1000.0) - make_interval(secs => $3)`,
      [expires, sid, TOUCH_INTERVAL_MS / 1000],
    ).then(
      () => {
        storedExpiry.set(sess, expires);
        callback?.();
      },
      (error: unknown) => callback?.(error),
    );
  }
}
