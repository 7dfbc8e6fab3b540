// The response cache: a web process keeps the JSON it computed for a signed-in person's GET of a
// route marked `cache: true` in its route table, and sends the same bytes again while the data
// version (server/db/data-version.ts) is unchanged. Any committed write anywhere in the shop grows
// the version, and the version is read with the session before the request reads anything, so a
// request that starts after a write never gets a response computed before it, in this process or
// another.
//
// Rules a cached route keeps: its JSON depends only on the database, the person (id and role) and
// the URL. Anything that follows the clock (late units, days waiting) may lag by at most TTL_MS,
// after which the entry is computed afresh even without a write. Entries are per person, so no one
// is ever sent what another's role would see.
//
// Requests that miss together wait for the first one's answer rather than computing it 50 times
// (one computation per person, URL and version at a time).
//
// It lives in memory, least recently used first out, MAX_BYTES in all. RESPONSE_CACHE=false turns
// it off (the api bench measures both ways).
import { createHash } from 'node:crypto';
import { brotliCompressSync, constants as zlib, gzipSync } from 'node:zlib';
import type { Request, RequestHandler, Response } from 'express';
import type { SessionUser } from '../../shared/roles';
import { dataVersionLoadedWithSession } from '../auth/session-store';

export const TTL_MS = 5_000;
export const MAX_BYTES = 32 * 1024 * 1024;
/** Set on every response of a cached route: whether it was sent from memory. */
export const CACHE_HEADER = 'x-kneepoint-cache';

/** Bodies under this size go out as they are (as compression's own threshold does, server/http/compression.ts). */
const COMPRESS_FROM_BYTES = 1024;
type Encoding = 'br' | 'gzip';

/** One stored answer: the JSON, its ETag, and each compressed form once some client has asked for it. */
export class StoredBody {
  readonly etag: string;
  private readonly encoded: Partial<Record<Encoding, Buffer>> = {};

  constructor(readonly raw: Buffer) {
    this.etag = `W/"${raw.length.toString(16)}-${createHash('sha1').update(raw).digest('base64url')}"`;
  }

  /** The body in `encoding`, compressed on first use (brotli at quality 4, as compression would). */
  as(encoding: Encoding): Buffer {
    let body = this.encoded[encoding];
    if (!body) {
      body = encoding === 'br' ? brotliCompressSync(this.raw, { params: { [zlib.BROTLI_PARAM_QUALITY]: 4 } }) : gzipSync(this.raw);
      this.encoded[encoding] = body;
    }
    return body;
  }
}

// Charged at twice the JSON's size: room for its compressed forms, which are smaller than it.
interface Entry { version: number; at: number; body: StoredBody; charged: number }

export class ResponseCache {
  private readonly entries = new Map<string, Entry>();
  private bytes = 0;
  private newest = 0;
  private readonly computing = new Map<string, Promise<StoredBody | undefined>>();

  constructor(private readonly maxBytes = MAX_BYTES, private readonly ttlMs = TTL_MS, private readonly now = () => Date.now()) {}

  get size() { return this.entries.size; }

  /** The body stored for `key` at exactly this version and within the TTL, if any. */
  get(key: string, version: number): StoredBody | undefined {
    this.forgetOlderThan(version);
    const entry = this.entries.get(key);
    if (!entry) return undefined;
    if (entry.version !== version || this.now() - entry.at > this.ttlMs) {
      this.remove(key, entry);
      return undefined;
    }
    // Most recently used goes last, so eviction takes from the front.
    this.entries.delete(key);
    this.entries.set(key, entry);
    return entry.body;
  }

  set(key: string, version: number, body: StoredBody): void {
    this.forgetOlderThan(version);
    if (version < this.newest || body.raw.length > this.maxBytes / 4) return;
    const old = this.entries.get(key);
    if (old) this.remove(key, old);
    const charged = body.raw.length * 2;
    this.entries.set(key, { version, at: this.now(), body, charged });
    this.bytes += charged;
    for (const [k, e] of this.entries) {
      if (this.bytes <= this.maxBytes) break;
      this.remove(k, e);
    }
  }

  /**
   * The answer another request is computing for `key` at `version`, or undefined when none is:
   * then the caller computes it and must call the returned `done` with the body (or undefined if it
   * failed), which also stores it.
   */
  join(key: string, version: number): { wait: Promise<StoredBody | undefined> } | { done: (body: StoredBody | undefined) => void } {
    const slot = `${version}|${key}`;
    const wait = this.computing.get(slot);
    if (wait) return { wait };
    let finish!: (body: StoredBody | undefined) => void;
    this.computing.set(slot, new Promise((resolve) => { finish = resolve; }));
    let settled = false;
    return {
      done: (body) => {
        if (settled) return;
        settled = true;
        this.computing.delete(slot);
        if (body !== undefined) this.set(key, version, body);
        finish(body);
      },
    };
  }

  /** A newer version makes every stored entry useless: drop them all at once. */
  private forgetOlderThan(version: number) {
    if (version <= this.newest) return;
    this.newest = version;
    this.entries.clear();
    this.bytes = 0;
  }

  private remove(key: string, entry: Entry) {
    this.entries.delete(key);
    this.bytes -= entry.charged;
  }
}

/**
 * Middleware for one cached route: answers from the cache when it can, else lets the handler run
 * and keeps what its res.json sends with status 200. Requests without a stored session (just signed
 * in, or anonymous) pass through untouched.
 */
export function serveCached(cache: ResponseCache): RequestHandler {
  return (req: Request, res: Response, next) => {
    const user = req.user as SessionUser | undefined;
    const version = dataVersionLoadedWithSession(req.session);
    if (!user || version === undefined) return next();
    const key = `${user.id}:${user.role}:${req.originalUrl}`;
    const body = cache.get(key, version);
    if (body !== undefined) return sendStored(req, res, body, 'hit');
    const turn = cache.join(key, version);
    if ('wait' in turn) {
      turn.wait.then((shared) => (shared !== undefined ? sendStored(req, res, shared, 'hit') : next()), next);
      return;
    }
    // Whatever happens to this request (an error, a closed connection), the waiting ones go on.
    res.once('close', () => turn.done(undefined));
    res.json = (value: unknown) => {
      const text = JSON.stringify(value);
      if (res.statusCode !== 200 || text === undefined) {
        turn.done(undefined);
        return res.type('json').send(text);
      }
      const stored = new StoredBody(Buffer.from(text));
      turn.done(stored);
      sendStored(req, res, stored, 'miss');
      return res;
    };
    next();
  };
}

/**
 * Sends a stored body as Express would have sent the JSON: its ETag (a 304 when the client has it),
 * compressed the way the client prefers. It carries its Content-Encoding already, so the
 * compression middleware lets it through untouched.
 */
function sendStored(req: Request, res: Response, body: StoredBody, how: 'hit' | 'miss') {
  res.setHeader(CACHE_HEADER, how);
  res.setHeader('Content-Type', 'application/json; charset=utf-8');
  res.setHeader('ETag', body.etag);
  res.vary('Accept-Encoding');
  if (req.fresh) {
    res.status(304).end();
    return;
  }
  // Brotli first when the client takes both, as compression does.
  const encoding = body.raw.length < COMPRESS_FROM_BYTES ? undefined
    : req.acceptsEncodings('br') ? 'br' : req.acceptsEncodings('gzip') ? 'gzip' : undefined;
  const bytes = encoding ? body.as(encoding) : body.raw;
  if (encoding) res.setHeader('Content-Encoding', encoding);
  res.setHeader('Content-Length', bytes.length);
  res.end(req.method === 'HEAD' ? undefined : bytes);
}
