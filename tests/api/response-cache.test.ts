// The response cache and the data version behind it (server/http/response-cache.ts,
// server/db/data-version.ts): a write anywhere, committed by any process, is seen by the next
// request everywhere; nothing is ever served across people; rolled-back writes change nothing.
import { afterAll, describe, expect, it } from 'vitest';
import { readDataVersion, trackedTables, DATA_VERSION_TRIGGER, DATA_VERSION_TRUNCATE_TRIGGER } from '../../server/db/data-version';
import { CACHE_HEADER, ResponseCache, StoredBody, TTL_MS } from '../../server/http/response-cache';
import { DEMO, signedInAgent, startTestApp } from '../support/app';

const a = startTestApp();
const b = startTestApp();
afterAll(() => Promise.all([a.stop(), b.stop()]));

const body = (text: string) => new StoredBody(Buffer.from(text));

describe('the data version', () => {
  it('every table of the shop carries both triggers (generated from the catalog)', async () => {
    // Scratch tables other test files make and drop while this runs are not the shop's.
    const tables = (await trackedTables(a.knex)).filter((name) => !name.endsWith('_probe'));
    expect(tables.length).toBeGreaterThan(40);
    const { rows } = await a.knex.raw<{ rows: { table: string; name: string }[] }>(
      `SELECT c.relname AS table, t.tgname AS name FROM pg_trigger t JOIN pg_class c ON c.oid = t.tgrelid
       WHERE t.tgname IN (?, ?) AND c.relnamespace = current_schema()::regnamespace`,
      [DATA_VERSION_TRIGGER, DATA_VERSION_TRUNCATE_TRIGGER],
    );
    const missing = tables.flatMap((table) => [DATA_VERSION_TRIGGER, DATA_VERSION_TRUNCATE_TRIGGER]
      .filter((name) => !rows.some((r) => r.table === table && r.name === name)).map((name) => `${table}: ${name}`));
    expect(missing).toEqual([]);
  });

  it('grows once a writing transaction commits, however many rows it wrote, and not for a rollback', async () => {
    const before = await readDataVersion(a.knex);
    await a.knex.transaction(async (trx) => {
      await trx('suppliers').insert([{ name: `Cache probe A ${Date.now()}` }, { name: `Cache probe B ${Date.now()}` }]);
      await trx('suppliers').where('name', 'like', 'Cache probe %').update({ default_lead_time_days: 9 });
      // Inside the transaction nothing has changed yet: the bump waits for COMMIT.
      expect(await readDataVersion(trx)).toBe(before);
    });
    const committed = await readDataVersion(a.knex);
    // Other test files commit at the same time, so "at least one" is all one file can assert; this
    // one's own transaction alone would be exactly one.
    expect(committed).toBeGreaterThan(before);
    await a.knex.transaction(async (trx) => {
      await trx('suppliers').insert({ name: `Cache probe C ${Date.now()}` });
      throw new Error('roll back');
    }).catch(() => undefined);
    const rows = await a.knex('suppliers').where('name', 'like', 'Cache probe C %');
    expect(rows).toEqual([]);
    await a.knex('suppliers').where('name', 'like', 'Cache probe %').delete();
  });
});

describe('the response cache over HTTP', () => {
  it('answers a repeated GET from memory and a GET after another process\'s write afresh', async () => {
    const onA = await signedInAgent(a.app, DEMO.planner);
    const onB = await signedInAgent(b.app, DEMO.planner);
    const partNumber = `CACHE-${process.pid}-${Date.now()}`;
    const list = `/api/parts?q=${partNumber}`;
    // Retried while other test files' writes keep moving the version between the two reads.
    let second = '';
    for (let i = 0; i < 20 && second !== 'hit'; i++) {
      await onB.get(list).expect(200);
      second = (await onB.get(list).expect(200)).headers[CACHE_HEADER];
    }
    expect(second).toBe('hit');
    expect((await onB.get(list).expect(200)).body.items).toEqual([]);
    await onA.post('/api/parts').set('X-CSRF-Token', onA.csrf)
      .send({ partNumber, category: 'resistor', value: '1kΩ', unitCostCents: 5, leadTimeDays: 3, reorderPoint: 10 }).expect(201);
    const after = await onB.get(list).expect(200);
    expect(after.headers[CACHE_HEADER]).toBe('miss');
    expect(after.body.items.map((p: { partNumber: string }) => p.partNumber)).toEqual([partNumber]);
  });

  it('never sends one person\'s answer to another, and keeps ETags and compression', async () => {
    const planner = await signedInAgent(a.app, DEMO.planner);
    const owner = await signedInAgent(a.app, DEMO.owner);
    await planner.get('/api/models').expect(200);
    const first = await owner.get('/api/models').set('Accept-Encoding', 'gzip').expect(200);
    expect(first.headers[CACHE_HEADER]).toBe('miss');
    const etag = first.headers.etag;
    expect(etag).toMatch(/^W\/"/);
    if (Number(first.headers['content-length'] ?? 0) >= 1024 || first.headers['content-encoding']) expect(first.headers['content-encoding']).toBe('gzip');
    const again = await owner.get('/api/models').set('If-None-Match', etag);
    // 304 when nothing was written in between; a write by another test file makes it a fresh 200.
    expect([200, 304]).toContain(again.status);
  });

  it('is off with RESPONSE_CACHE=false', async () => {
    const off = startTestApp({ RESPONSE_CACHE: 'false' });
    try {
      const planner = await signedInAgent(off.app, DEMO.planner);
      await planner.get('/api/suppliers').expect(200);
      const res = await planner.get('/api/suppliers').expect(200);
      expect(res.headers[CACHE_HEADER]).toBeUndefined();
    } finally {
      await off.stop();
    }
  });
});

describe('ResponseCache', () => {
  it('serves an entry only at its own version and within the TTL', () => {
    let now = 0;
    const cache = new ResponseCache(1024 * 1024, TTL_MS, () => now);
    cache.set('k', 5, body('{"a":1}'));
    expect(cache.get('k', 5)?.raw.toString()).toBe('{"a":1}');
    now = TTL_MS + 1;
    expect(cache.get('k', 5)).toBeUndefined();
    cache.set('k', 5, body('{"a":2}'));
    expect(cache.get('k', 6)).toBeUndefined();
    // A late computation under an older version is not kept once a newer one was seen.
    cache.set('k', 5, body('{"a":3}'));
    expect(cache.get('k', 5)).toBeUndefined();
    expect(cache.size).toBe(0);
  });

  it('drops the least recently used entries past its size', () => {
    const cache = new ResponseCache(2 * 3 * 100, TTL_MS, () => 0);
    const text = (c: string) => JSON.stringify(c.repeat(98));
    cache.set('a', 1, body(text('a')));
    cache.set('b', 1, body(text('b')));
    cache.set('c', 1, body(text('c')));
    expect(cache.get('a', 1)).toBeDefined();
    cache.set('d', 1, body(text('d')));
    expect(cache.get('b', 1)).toBeUndefined();
    expect(cache.get('a', 1)).toBeDefined();
    expect(cache.get('d', 1)).toBeDefined();
  });

  it('lets requests that miss together wait for one computation', async () => {
    const cache = new ResponseCache();
    const first = cache.join('k', 1);
    const second = cache.join('k', 1);
    expect('done' in first && 'wait' in second).toBe(true);
    if (!('done' in first) || !('wait' in second)) return;
    first.done(body('{"n":1}'));
    expect((await second.wait)?.raw.toString()).toBe('{"n":1}');
    expect(cache.get('k', 1)?.raw.toString()).toBe('{"n":1}');
    // A failed computation hands the waiters nothing, and the next request computes again.
    const third = cache.join('j', 1);
    const fourth = cache.join('j', 1);
    if (!('done' in third) || !('wait' in fourth)) throw new Error('expected one computing, one waiting');
    third.done(undefined);
    expect(await fourth.wait).toBeUndefined();
    expect('done' in cache.join('j', 1)).toBe(true);
  });

  it('compresses a stored body once per encoding', () => {
    const stored = body(JSON.stringify({ rows: 'x'.repeat(5000) }));
    const gz = stored.as('gzip');
    expect(stored.as('gzip')).toBe(gz);
    expect(gz.length).toBeLessThan(stored.raw.length);
    expect(stored.as('br').length).toBeLessThan(stored.raw.length);
  });
});
