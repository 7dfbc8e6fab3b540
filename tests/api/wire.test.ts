// Less on the wire: API responses compressed as the client asks, the built client served from its
// precompressed copies with long cache headers, and the session expiry written at most once a minute.
import { existsSync, readFileSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { IMMUTABLE } from '../../server/http/static-files';
import { DEMO, DEMO_PASSWORD, signedInAgent, startTestApp } from '../support/app';
import { listen } from '../support/browser';

const t = startTestApp();
let server: Awaited<ReturnType<typeof listen>>;
beforeAll(async () => { server = await listen(t.app); });
afterAll(async () => {
  await server.close();
  await t.stop();
});

/** A GET with the raw bytes as they crossed the wire (no client-side decoding). */
function raw(urlPath: string, headers: Record<string, string> = {}) {
  return new Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }>((resolve, reject) => {
    http.get(`${server.url}${urlPath}`, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    }).on('error', reject);
  });
}

/** Signs in over HTTP as a browser would and returns the session cookie. */
async function signInCookie(email: string) {
  const first = await fetch(`${server.url}/api/auth/csrf`);
  const { csrfToken } = (await first.json()) as { csrfToken: string };
  const login = await fetch(`${server.url}/api/auth/login`, {
    method: 'POST',
    headers: { cookie: first.headers.getSetCookie()[0].split(';')[0], 'content-type': 'application/json', 'x-csrf-token': csrfToken },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  expect(login.status).toBe(200);
  return login.headers.getSetCookie()[0].split(';')[0];
}

describe('API responses', () => {
  it('are gzip- or brotli-encoded when the client asks, and plain when it does not', async () => {
    const cookie = await signInCookie(DEMO.planner);
    const plain = await raw('/api/parts', { cookie, 'accept-encoding': 'identity' });
    expect(plain.status).toBe(200);
    expect(plain.headers['content-encoding']).toBeUndefined();
    const list = JSON.parse(plain.body.toString('utf8'));
    expect(plain.body.length).toBeGreaterThan(1024);

    const gz = await raw('/api/parts', { cookie, 'accept-encoding': 'gzip' });
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(gz.headers.vary).toMatch(/Accept-Encoding/i);
    expect(JSON.parse(gunzipSync(gz.body).toString('utf8'))).toEqual(list);
    expect(gz.body.length).toBeLessThan(plain.body.length / 3);

    const br = await raw('/api/parts', { cookie, 'accept-encoding': 'gzip, deflate, br' });
    expect(br.headers['content-encoding']).toBe('br');
    expect(JSON.parse(brotliDecompressSync(br.body).toString('utf8'))).toEqual(list);

    // Small answers are not worth it and go as they are.
    const small = await raw('/api/health', { 'accept-encoding': 'gzip' });
    expect(small.headers['content-encoding']).toBeUndefined();
  });

  it('leave PDFs as they are: they are compressed already', async () => {
    const cookie = await signInCookie(DEMO.planner);
    const unit = await t.knex('units').whereNotNull('serial').orderBy('id').first('serial');
    const pdf = await raw(`/api/units/${unit.serial}/spec-sheet.pdf`, { cookie, 'accept-encoding': 'gzip, br' });
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect(pdf.headers['content-encoding']).toBeUndefined();
    expect(pdf.body.subarray(0, 5).toString('latin1')).toBe('%PDF-');
  }, 30_000);
});

const dist = path.resolve(import.meta.dirname, '../../dist');
describe.skipIf(!existsSync(path.join(dist, 'index.html')))('the built client (needs `npm test` without KP_QUICK to build it)', () => {
  it('sends index.html to be revalidated every time', async () => {
    for (const page of ['/', '/shop', '/orders/12']) {
      const res = await raw(page, { 'accept-encoding': 'identity' });
      expect(res.status).toBe(200);
      expect(res.headers['cache-control']).toBe('no-cache');
      expect(res.body.toString('utf8')).toContain('<div id="root">');
    }
  });

  it('sends hashed assets precompressed, by Accept-Encoding, cached for a year', async () => {
    const html = readFileSync(path.join(dist, 'index.html'), 'utf8');
    const script = /src="(\/assets\/[^"]+\.js)"/.exec(html)?.[1];
    expect(script).toBeDefined();
    const file = readFileSync(path.join(dist, script!));
    expect(existsSync(path.join(dist, `${script}.br`)) && existsSync(path.join(dist, `${script}.gz`))).toBe(true);

    const br = await raw(script!, { 'accept-encoding': 'gzip, deflate, br' });
    expect(br.status).toBe(200);
    expect(br.headers).toMatchObject({ 'content-encoding': 'br', 'cache-control': IMMUTABLE });
    expect(br.headers['content-type']).toMatch(/javascript/);
    expect(br.headers.vary).toMatch(/Accept-Encoding/i);
    expect(br.body.equals(readFileSync(path.join(dist, `${script}.br`)))).toBe(true);
    expect(brotliDecompressSync(br.body).equals(file)).toBe(true);

    const gz = await raw(script!, { 'accept-encoding': 'gzip' });
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(gunzipSync(gz.body).equals(file)).toBe(true);

    const refusesBr = await raw(script!, { 'accept-encoding': 'br;q=0, gzip' });
    expect(refusesBr.headers['content-encoding']).toBe('gzip');

    const plain = await raw(script!, { 'accept-encoding': 'identity' });
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.headers['cache-control']).toBe(IMMUTABLE);
    expect(plain.body.equals(file)).toBe(true);
  });

  it('sends the subset mono font as WOFF2, not compressed again, and no TTF', async () => {
    const css = /href="(\/assets\/[^"]+\.css)"/.exec(readFileSync(path.join(dist, 'index.html'), 'utf8'))?.[1];
    const styles = (await raw(css!, { 'accept-encoding': 'identity' })).body.toString('utf8');
    expect(styles).not.toMatch(/\.ttf\)/);
    const font = /url\((\/assets\/kneepoint-mono-[\w-]+\.woff2)\)/.exec(styles)?.[1];
    expect(font).toBeDefined();
    const res = await raw(font!, { 'accept-encoding': 'gzip, br' });
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBeUndefined();
    expect(res.headers['cache-control']).toBe(IMMUTABLE);
    expect(res.body.subarray(0, 4).toString('latin1')).toBe('wOF2');
  });

  it('answers 404 for a hashed file that does not exist, not the page', async () => {
    const res = await raw('/assets/index-gone.js', { 'accept-encoding': 'gzip' });
    expect(res.status).toBe(404);
  });
});

describe('session expiry', () => {
  // Every UPDATE gives the row a new xmin, so it counts writes exactly.
  const row = async (sid: string) => (await t.knex.raw(`SELECT xmin::text AS xmin, expire FROM "session" WHERE sid = ?`, [sid])).rows[0] as { xmin: string; expire: Date };

  it('is written at most once a minute however many requests come', async () => {
    const agent = await signedInAgent(t.app, DEMO.tester);
    const { rows } = await t.knex.raw(`SELECT sid FROM "session" WHERE sess -> 'passport' ->> 'user' = (SELECT id::text FROM users WHERE email = ?) ORDER BY expire DESC LIMIT 1`, [DEMO.tester]);
    const sid = rows[0].sid as string;
    const signedIn = await row(sid);
    await agent.get('/api/auth/me').expect(200);
    await agent.get('/api/auth/me').expect(200);
    expect(await row(sid)).toEqual(signedIn);

    // As if the expiry was last written two minutes ago: the next request writes it, the one after does not.
    await t.knex.raw(`UPDATE "session" SET expire = expire - interval '2 minutes' WHERE sid = ?`, [sid]);
    const aged = await row(sid);
    await agent.get('/api/auth/me').expect(200);
    const touched = await row(sid);
    expect(touched.xmin).not.toBe(aged.xmin);
    expect(touched.expire.getTime() - aged.expire.getTime()).toBeGreaterThanOrEqual(115_000);
    await agent.get('/api/auth/me').expect(200);
    await agent.get('/api/auth/csrf').expect(200);
    expect(await row(sid)).toEqual(touched);
  });
});

describe('the account read with the session', () => {
  it('costs no query of its own on a signed-in request, and still follows role changes and deactivation at once', async () => {
    const owner = await signedInAgent(t.app, DEMO.owner);
    const email = `session-read-${Date.now()}@shop.example`;
    const created = await owner.post('/api/users').set('X-CSRF-Token', owner.csrf).send({ name: 'Session Read', email, role: 'assembler', password: 'first-password-1' }).expect(201);
    const person = await signedInAgent(t.app, email, 'first-password-1');

    let accountReads = 0;
    const count = (q: { sql: string }) => { if (/from "users"/i.test(q.sql)) accountReads += 1; };
    t.knex.on('query', count);
    try {
      const me = await person.get('/api/auth/me').expect(200);
      expect(me.body.user).toMatchObject({ email, role: 'assembler' });
      expect(accountReads).toBe(0);
    } finally {
      t.knex.off('query', count);
    }

    await owner.patch(`/api/users/${created.body.user.id}`).set('X-CSRF-Token', owner.csrf).send({ role: 'tester' }).expect(200);
    expect((await person.get('/api/auth/me').expect(200)).body.user.role).toBe('tester');
    await owner.patch(`/api/users/${created.body.user.id}`).set('X-CSRF-Token', owner.csrf).send({ active: false }).expect(200);
    await person.get('/api/auth/me').expect(401);
  });
});
