// The built client (dist/): precompressed .br/.gz copies made at build time
// (scripts/build/precompress.ts) are sent as they are when the browser accepts them,
// and each file gets the cache lifetime it can bear.
import express, { type Request, type Response } from 'express';
import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';

// Vite names files under /assets by a hash of their content: a changed file is a new URL.
export const IMMUTABLE = 'public, max-age=31536000, immutable';
// index.html names the current hashed files, so the browser must check it every time.
export const REVALIDATE = 'no-cache';
const SHORT = 'public, max-age=3600';

export function cacheControlFor(relativePath: string): string {
  if (relativePath.startsWith('assets/')) return IMMUTABLE;
  if (relativePath.endsWith('.html')) return REVALIDATE;
  return SHORT;
}

/**
 * The precompressed copy to send: brotli, then gzip, among those that exist, as the request's
 * Accept-Encoding allows (a q of 0 refuses one); null means the file as it is.
 */
export function chooseEncoding(acceptEncoding: string | undefined, has = { br: true, gzip: true }): 'br' | 'gzip' | null {
  const q = new Map<string, number>();
  for (const part of (acceptEncoding ?? '').split(',')) {
    const [name, ...params] = part.trim().toLowerCase().split(';');
    if (!name) continue;
    const qParam = params.map((p) => p.trim()).find((p) => p.startsWith('q='));
    q.set(name, qParam ? Number(qParam.slice(2)) || 0 : 1);
  }
  const allows = (name: string) => (q.get(name) ?? q.get('*') ?? 0) > 0;
  if (has.br && allows('br')) return 'br';
  if (has.gzip && allows('gzip')) return 'gzip';
  return null;
}

function* walk(dir: string, prefix = ''): Generator<string> {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const rel = prefix + entry.name;
    if (entry.isDirectory()) yield* walk(path.join(dir, entry.name), `${rel}/`);
    else yield rel;
  }
}

/** Serves dist/ with precompressed variants and cache headers; unknown non-API paths get index.html. */
export function clientFiles(dist: string) {
  // Which files have variants is fixed by the build, so look once rather than stat on each request.
  const variants = new Map<string, { br: boolean; gzip: boolean }>();
  for (const rel of walk(dist)) {
    if (rel.endsWith('.br') || rel.endsWith('.gz')) continue;
    const br = existsSync(path.join(dist, `${rel}.br`));
    const gzip = existsSync(path.join(dist, `${rel}.gz`));
    if (br || gzip) variants.set(rel, { br, gzip });
  }

  const send = (req: Request, res: Response, next: (e?: unknown) => void, rel: string) => {
    const has = variants.get(rel);
    res.setHeader('Cache-Control', cacheControlFor(rel));
    if (has) res.vary('Accept-Encoding');
    const encoding = has ? chooseEncoding(req.headers['accept-encoding'], has) : null;
    if (encoding) {
      res.type(path.extname(rel));
      res.setHeader('Content-Encoding', encoding);
    }
    const file = encoding ? `${rel}.${encoding === 'br' ? 'br' : 'gz'}` : rel;
    res.sendFile(file, { root: dist, cacheControl: false, dotfiles: 'deny' }, (error) => error && next(error));
  };

  const router = express.Router();
  router.use((req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    let rel: string;
    try {
      rel = decodeURIComponent(req.path).replace(/^\/+/, '');
    } catch {
      return next();
    }
    // Looked up in the build's own list, so no request path reaches the disk here.
    if (variants.has(rel)) return send(req, res, next, rel);
    next();
  });
  router.use(express.static(dist, {
    index: false,
    cacheControl: false,
    setHeaders: (res, file) => res.setHeader('Cache-Control', cacheControlFor(path.relative(dist, file).split(path.sep).join('/'))),
  }));
  // A hashed file that is gone (an old page after a release) is a 404, not the page in its place.
  router.get(/^\/(?!api\/|assets\/).*/, (req, res, next) => send(req, res, next, 'index.html'));
  return router;
}
