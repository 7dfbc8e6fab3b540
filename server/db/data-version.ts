// The data version: one number that grows whenever any committed transaction has written the
// shop's data. It is the key that lets the web processes reuse a computed response (see
// server/http/response-cache.ts) without ever serving one older than a write someone has seen
// succeed, across any number of processes sharing the database.
//
// The counter, its function and the triggers are made by migrations/20261205180000_add-data-version.ts;
// a migration that creates a table adds the same two triggers to it (migrations never import this
// file), and tests/api/response-cache.test.ts fails for any table of the shop without them.
//
// How it grows: every table of the shop's data carries a deferred constraint trigger. It fires at
// COMMIT, so the one row of `data_version` is locked only for the instant between a transaction's
// last statement and its commit, after every lock the transaction took in LOCK_ORDER (no new lock
// cycle can form: a committing transaction waits for nothing else). A transaction-local setting
// makes the bump happen once per transaction, however many rows it wrote. TRUNCATE has a
// statement trigger of its own (constraint triggers cannot watch it).
//
// A reader takes the version before it reads the data (the session query returns it), so a
// response is stored under a version no newer than the data it holds; a request that starts after
// a commit sees the bumped version and never the stored response.
import type { Knex } from 'knex';

/** Tables whose writes change no response: sessions, sign-in counters, the migrator's own, the bench's label. */
export const UNTRACKED_TABLES = ['session', 'rate_limits', 'knex_migrations', 'knex_migrations_lock', 'data_version', 'bench_dataset'] as const;

export const DATA_VERSION_TRIGGER = 'kp_data_version';
export const DATA_VERSION_TRUNCATE_TRIGGER = 'kp_data_version_truncate';

/** The shop's tables in the public schema, which must carry the triggers (for the test). */
export async function trackedTables(knex: Knex): Promise<string[]> {
  const { rows } = await knex.raw<{ rows: { name: string }[] }>(
    `SELECT tablename AS name FROM pg_tables WHERE schemaname = current_schema() ORDER BY tablename`,
  );
  return rows.map((r) => r.name).filter((name) => !(UNTRACKED_TABLES as readonly string[]).includes(name));
}

/** The current data version (the session query reads it too, in the same round trip). */
export async function readDataVersion(knex: Knex): Promise<number> {
  const row = await knex('data_version').first('n');
  return Number(row?.n ?? 0);
}
