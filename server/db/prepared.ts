// Named prepared statements for knex's queries on PostgreSQL.
//
// knex sends every query unnamed, so PostgreSQL parses and plans it again on each execution; for the
// short list and page queries this product runs, that planning costs several times the execution
// (the logged parse + bind against execute). A named statement is parsed once per connection, and
// after five executions PostgreSQL may keep a generic plan for it and stop planning at all.
//
// Rules, kept simple on purpose:
// - Only plain SELECT / WITH / INSERT / UPDATE / DELETE are named, and only when they are surely one
//   command (a named statement goes through the extended protocol, which refuses two): those with
//   bindings (already sent that way) and those without a semicolon anywhere in their text.
// - The name is a digest of the SQL text, so the same text always has the same name, in every
//   process and on every pooled connection.
// - At most MAX_NAMED texts are named per process (IN lists of varying length make new texts);
//   after that, new texts run unnamed as before. Each connection holds at most that many statements.
// - A statement prepared before a migration changed its table's columns fails once with
//   "cached plan must not change result type" (SQLSTATE 0A000); outside a transaction it is dropped
//   and run again, inside one the error stands (the transaction is already aborted).
// A pooler in transaction mode must support protocol-level prepared statements (PgBouncer does
// from 1.21 with max_prepared_statements set); README's "Running on more than one machine" says so.
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';

export const MAX_NAMED = 1000;
const PREPARABLE = /^\s*(select|with|insert|update|delete)\b/i;
const CHANGED_RESULT_TYPE = '0A000';

interface QueryObject { sql: string; bindings?: unknown[]; options?: Record<string, unknown> }
interface PgConnection { connection?: { parsedStatements?: Record<string, string> }; query: (text: string) => Promise<unknown> }
type RunQuery = (connection: PgConnection, obj: QueryObject) => Promise<unknown>;

/** Statement names by SQL text, shared by every knex instance in this process. */
const names = new Map<string, string>();

/** The statement name for this SQL, or undefined when it stays unnamed. */
export function statementName(sql: string, bindingCount: number): string | undefined {
  if (!PREPARABLE.test(sql) || (bindingCount === 0 && sql.includes(';'))) return undefined;
  let name = names.get(sql);
  if (name === undefined && names.size < MAX_NAMED) {
    name = `kp_${createHash('sha1').update(sql).digest('hex').slice(0, 24)}`;
    names.set(sql, name);
  }
  return name;
}

/** Makes this knex instance (PostgreSQL client) run its queries as named prepared statements. */
export function usePreparedStatements(knex: Knex): void {
  const client = knex.client as unknown as { _query: RunQuery };
  const run = client._query.bind(client);
  client._query = async (connection, obj) => {
    const name = obj.options?.name === undefined ? statementName(obj.sql, obj.bindings?.length ?? 0) : undefined;
    if (name === undefined) return run(connection, obj);
    obj.options = { ...obj.options, name };
    try {
      return await run(connection, obj);
    } catch (error) {
      const inTransaction = Boolean((connection as { __knexTxId?: unknown }).__knexTxId);
      if ((error as { code?: string }).code !== CHANGED_RESULT_TYPE || inTransaction) throw error;
      // The table changed under the prepared statement: forget it on this connection and prepare again.
      delete connection.connection?.parsedStatements?.[name];
      await connection.query(`DEALLOCATE ${name}`).catch(() => undefined);
      return run(connection, obj);
    }
  };
}

/**
 * `column IN ('a', 'b')` with the values written into the SQL text instead of bound, for fixed lists
 * that come from the code (states, roles), never from a request. A bound list hides which values
 * they are, so PostgreSQL cannot keep a good generic plan and plans the query on every execution;
 * written in, the cached plan knows them. Only plain lower-case words are accepted.
 */
export function inConstants(knex: Knex | Knex.Transaction, column: string, values: readonly string[]): Knex.Raw {
  if (values.length === 0) throw new Error('inConstants needs at least one value');
  for (const value of values) {
    if (!/^[a-z][a-z0-9_]*$/.test(value)) throw new Error(`inConstants takes plain words from the code, not ${JSON.stringify(value)}`);
  }
  return knex.raw(`?? IN (${values.map((v) => `'${v}'`).join(', ')})`, [column]);
}
