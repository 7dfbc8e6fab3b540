import { afterAll, describe, expect, it } from 'vitest';
import { createKnex } from '../../server/db/knex';
import { statementName } from '../../server/db/prepared';
import { startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());

describe('named prepared statements (server/db/prepared.ts)', () => {
  it('names only single SELECT/WITH/INSERT/UPDATE/DELETE statements, by a digest of their text', () => {
    const sql = 'select * from "parts" where "id" = $1';
    expect(statementName(sql, 1)).toMatch(/^kp_[0-9a-f]{24}$/);
    expect(statementName(sql, 1)).toBe(statementName(sql, 1));
    expect(statementName('select * from "parts" where "id" = $2', 1)).not.toBe(statementName(sql, 1));
    expect(statementName('select * from "parts"', 0)).toMatch(/^kp_/);
    // Without bindings, text that may hold two commands stays unnamed (the extended protocol refuses two).
    expect(statementName('select 1; select 2', 0)).toBeUndefined();
    expect(statementName('ALTER TABLE parts ADD COLUMN x int', 1)).toBeUndefined();
  });

  it('parses a query once per connection and reuses it', async () => {
    // One connection, so the statement's second run lands where the first was prepared.
    const knex = createKnex(process.env.DATABASE_URL!, 1);
    try {
      const read = () => knex('users').where({ email: 'nobody-prepared@shop.example' }).first('id');
      await read();
      await read();
      const { rows } = await knex.raw(`SELECT name, statement FROM pg_prepared_statements WHERE name LIKE 'kp_%'`);
      const users = (rows as { name: string; statement: string }[]).filter((r) => r.statement.includes('from "users" where "email" = $1'));
      expect(users).toHaveLength(1);
      expect(users[0].name).toBe(statementName(users[0].statement, 1));
    } finally {
      await knex.destroy();
    }
  });

  it('runs a prepared query again after a migration changed the columns it returns', async () => {
    const knex = createKnex(process.env.DATABASE_URL!, 1);
    try {
      await knex.schema.createTable('prepared_probe', (table) => { table.increments('id'); table.text('a'); });
      await knex('prepared_probe').insert({ a: 'one' });
      const read = () => knex('prepared_probe').where('id', '>', 0).select('*');
      expect(await read()).toEqual([{ id: 1, a: 'one' }]);
      await knex.schema.alterTable('prepared_probe', (table) => { table.text('b').defaultTo('two'); });
      // PostgreSQL refuses the old statement (result type changed); it is dropped and prepared again.
      expect(await read()).toEqual([{ id: 1, a: 'one', b: 'two' }]);
      expect(await read()).toEqual([{ id: 1, a: 'one', b: 'two' }]);
    } finally {
      await knex.schema.dropTableIfExists('prepared_probe');
      await knex.destroy();
    }
  });
});
