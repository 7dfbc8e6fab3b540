import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { cappedCount } from '../../server/http/paged';
import { COUNT_CAP } from '../../shared/schemas/list';
import { startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());

const numbers = (n: number) => t.knex.from(t.knex.raw('generate_series(1, ?) AS g(i)', [n]));

describe('list counts stop at COUNT_CAP (server/http/paged.ts)', () => {
  it('counts exactly up to the cap', async () => {
    expect(await cappedCount(numbers(0))).toEqual({ total: 0, totalCapped: false });
    expect(await cappedCount(numbers(COUNT_CAP))).toEqual({ total: COUNT_CAP, totalCapped: false });
  });

  it('says "at least the cap" past it, reading no more than cap + 1 rows', async () => {
    expect(await cappedCount(numbers(COUNT_CAP + 1))).toEqual({ total: COUNT_CAP, totalCapped: true });
    expect(await cappedCount(numbers(5 * COUNT_CAP).where('i', '>', 7))).toEqual({ total: COUNT_CAP, totalCapped: true });
    // The statement it sends stops reading at cap + 1 rows: PostgreSQL's own plan says so.
    let sent: { sql: string; bindings: unknown[] } | undefined;
    const record = (q: { sql: string; bindings: unknown[] }) => { sent = q; };
    t.knex.on('query', record);
    await cappedCount(numbers(5 * COUNT_CAP));
    t.knex.off('query', record);
    const client = new pg.Client(process.env.DATABASE_URL);
    await client.connect();
    try {
      const { rows } = await client.query(`EXPLAIN (ANALYZE, FORMAT JSON) ${sent!.sql}`, sent!.bindings);
      expect(JSON.stringify(rows[0]['QUERY PLAN'])).toContain(`"Node Type":"Limit"`);
      expect(JSON.stringify(rows[0]['QUERY PLAN'])).toContain(`"Actual Rows":${COUNT_CAP + 1}`);
      expect(JSON.stringify(rows[0]['QUERY PLAN'])).not.toContain(`"Actual Rows":${5 * COUNT_CAP}`);
    } finally {
      await client.end();
    }
  });
});
