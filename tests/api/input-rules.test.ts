// The one owner of each input rule: the id parser, the calendar date, NUL refusal, the PostgreSQL
// error translation, the transaction retry and the 500 log line, each checked against the real
// database and app.
import express from 'express';
import request from 'supertest';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { dateSchema, idSchema, isCalendarDate, parseId } from '../../shared/schemas/common';
import { translatePgError } from '../../server/db/pg-errors';
import { withTransactionRetry } from '../../server/db/retry';
import { errorMiddleware, requestId } from '../../server/errors';
import { anonymousAgent, DEMO, signedInAgent, startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());

describe('the id parser (shared/schemas/common.ts)', () => {
  it('takes 1 … 2³¹−1 as digits or whole numbers, nothing else', () => {
    expect(parseId('1')).toBe(1);
    expect(parseId('2147483647')).toBe(2147483647);
    expect(parseId(42)).toBe(42);
    for (const bad of ['0', '-1', '2147483648', '1e308', '9999999999999999999', 'abc', '12abc', '1.5', '0x10', '012', ' 1', '', 0, -1, 1.5, 2147483648, 1e308, NaN, null, undefined, [], {}]) {
      expect(parseId(bad), JSON.stringify(bad)).toBeNull();
    }
    expect(idSchema.safeParse('7').data).toBe(7);
    expect(idSchema.safeParse(1e308).success).toBe(false);
  });
});

describe('the calendar date', () => {
  it('refuses days that do not exist', () => {
    expect(isCalendarDate('2026-12-07')).toBe(true);
    expect(isCalendarDate('2028-02-29')).toBe(true); // 2028 is a leap year (divisible by 4, not by 100)
    expect(isCalendarDate('2026-02-29')).toBe(false);
    expect(isCalendarDate('2026-02-31')).toBe(false);
    expect(isCalendarDate('2026-13-45')).toBe(false);
    expect(isCalendarDate('2026-04-31')).toBe(false);
    expect(isCalendarDate('26-1-1')).toBe(false);
    expect(dateSchema().safeParse('2026-02-31').error?.issues[0].message).toMatch(/2026-02-31 is not a day in the calendar/);
  });

  it('answers 400 with a field message for a release start of 2026-02-31, and the same for a plan proposal', async () => {
    const owner = await signedInAgent(t.app, DEMO.owner);
    const batch = await t.knex('batches').where({ state: 'draft' }).first('id');
    const id = batch?.id ?? 2147483647;
    for (const path of [`/api/batches/${id}/release`, `/api/batches/${id}/plan-proposal`]) {
      const res = await owner.post(path).set('X-CSRF-Token', owner.csrf).send({ startDate: '2026-02-31' });
      expect(res.status, path).toBe(400);
      expect(res.body.error.fields.startDate).toMatch(/not a day in the calendar/);
    }
    const month = await owner.post(`/api/batches/${id}/release`).set('X-CSRF-Token', owner.csrf).send({ startDate: '2026-13-45' });
    expect(month.status).toBe(400);
    const orders = await owner.get('/api/orders?from=2026-02-31');
    expect(orders.status).toBe(400);
    expect(orders.body.error.fields.from).toMatch(/not a day/);
  });
});

describe('NUL bytes', () => {
  it('are refused with a 400 in bodies, query strings and paths, signed in or not', async () => {
    const anon = await anonymousAgent(t.app);
    const login = await anon.post('/api/auth/login').set('X-CSRF-Token', anon.csrf).send({ email: 'a\u0000@shop.example', password: 'x' });
    expect(login.status).toBe(400);
    expect(login.body.error.fields.email).toMatch(/NUL/);
    const register = await anon.post('/api/auth/register').set('X-CSRF-Token', anon.csrf).send({ name: 'A\u0000B', email: 'nul@test.example', password: 'long enough password' });
    expect(register.status).toBe(400);
    const owner = await signedInAgent(t.app, DEMO.owner);
    expect((await owner.get('/api/parts?search=%00')).status).toBe(400);
    expect((await owner.get('/api/models/1%00')).status).toBe(400);
    const model = await owner.post('/api/models').set('X-CSRF-Token', owner.csrf).send({ name: 'Nul\u0000Drive', sku: 'NUL-1', basePriceCents: 100 });
    expect(model.status).toBe(400);
    expect(model.body.error.fields.name).toMatch(/NUL/);
  });
});

describe('PostgreSQL errors, translated in one place (server/db/pg-errors.ts)', () => {
  const pgError = async (sql: string, bindings: unknown[] = []) => {
    try {
      await t.knex.raw(sql, bindings as never);
    } catch (error) {
      return error;
    }
    throw new Error(`no error from ${sql}`);
  };

  it('answers out-of-range, wrong-type and impossible dates with 400 in words', async () => {
    for (const [sql, binding] of [['select ?::integer', '2147483648'], ['select ?::integer', 'abc'], ['select ?::date', '2026-02-31']] as const) {
      const translated = translatePgError(await pgError(sql, [binding]));
      expect(translated?.status, binding).toBe(400);
      expect(translated?.message).not.toMatch(/select|integer|::/i);
    }
  });

  it('answers a missing referenced row with 404 naming it, a row still in use with 409, a duplicate with 409', async () => {
    const part = await t.knex('parts').first('id');
    const fk = translatePgError(await pgError('insert into stock_movements (part_id, kind, quantity, on_hand_delta, reserved_delta, reason, batch_id) values (?, ?, 1, 1, 0, ?, 2147483647)', [part.id, 'receive', 'probe']));
    expect(fk?.status).toBe(404);
    expect(fk?.message).toBe('The batch this refers to does not exist');
    const check = translatePgError(await pgError('insert into stock_movements (part_id, kind, quantity, on_hand_delta, reserved_delta) values (?, ?, 1, 1, 0)', [part.id, 'bogus']));
    expect(check?.status).toBe(409);
    expect(check?.message).toBe('The change breaks a rule of the stock movement it touches');
    const inUse = translatePgError(await pgError('delete from parts where id = ?', [part.id]));
    expect(inUse?.status).toBe(409);
    const model = await t.knex('models').first('sku');
    const dup = translatePgError(await pgError("insert into models (name, sku, base_price_cents) values ('Dup', ?, 1)", [model.sku]));
    expect(dup?.status).toBe(409);
    expect(dup?.fields).toEqual({ sku: 'Already taken' });
  });

  it('answers a statement timeout with 503', async () => {
    const error = await t.knex.transaction(async (trx) => {
      await trx.raw('set local statement_timeout = 50');
      return trx.raw('select pg_sleep(2)').then(() => null, (e: unknown) => e);
    });
    expect(translatePgError(error)?.status).toBe(503);
  });
});

describe('withTransactionRetry (server/db/retry.ts)', () => {
  it('runs a deadlock victim again, so both transactions commit', async () => {
    await t.knex.schema.dropTableIfExists('retry_probe');
    await t.knex.schema.createTable('retry_probe', (table) => { table.integer('id').primary(); table.integer('n').notNullable(); });
    try {
      await t.knex('retry_probe').insert([{ id: 1, n: 0 }, { id: 2, n: 0 }]);
      let attempts = 0;
      let release!: () => void;
      const bothLocked = new Promise<void>((resolve) => { release = resolve; });
      let locked = 0;
      // Two transactions lock the rows in opposite orders: PostgreSQL aborts one with 40P01.
      const run = (first: number, second: number) => withTransactionRetry(t.knex, async (trx) => {
        attempts++;
        await trx('retry_probe').where({ id: first }).increment('n', 1);
        if (++locked === 2) release();
        await bothLocked;
        await trx('retry_probe').where({ id: second }).increment('n', 1);
      });
      await Promise.all([run(1, 2), run(2, 1)]);
      expect(attempts).toBeGreaterThanOrEqual(3);
      // Each transaction added 1 to both rows exactly once: nothing of the aborted attempt remains.
      expect(await t.knex('retry_probe').orderBy('id').pluck('n')).toEqual([2, 2]);
    } finally {
      await t.knex.schema.dropTableIfExists('retry_probe');
    }
  }, 20_000);
});

describe('the 500 log line', () => {
  it('is one line with the request id, without SQL, values or a stack', async () => {
    const app = express();
    app.use(requestId);
    app.get('/boom', async () => { await t.knex.raw("select * from no_such_table where secret = 'top-secret-value'"); });
    app.use(errorMiddleware);
    const logged: string[] = [];
    const spy = vi.spyOn(console, 'error').mockImplementation((...args: unknown[]) => { logged.push(args.map(String).join(' ')); });
    try {
      const res = await request(app).get('/boom');
      expect(res.status).toBe(500);
      const id = res.headers['x-request-id'];
      expect(res.body.error.message).toContain(id);
      expect(logged).toHaveLength(1);
      expect(logged[0]).toContain(id);
      expect(logged[0]).toContain('42P01');
      expect(logged[0]).not.toMatch(/select|top-secret-value|\n\s+at /);
    } finally {
      spy.mockRestore();
    }
  });
});
