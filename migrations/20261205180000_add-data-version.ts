import type { Knex } from 'knex';

// The data version that keys the web processes' response cache (server/db/data-version.ts explains
// it): a one-row counter, a function that grows it once per writing transaction, and on every table
// of the shop's data a deferred constraint trigger (fires at COMMIT) plus a TRUNCATE trigger.
// A later migration that creates a table adds the same two triggers to it;
// tests/api/response-cache.test.ts fails for any table left without them.
const UNTRACKED = ['session', 'rate_limits', 'knex_migrations', 'knex_migrations_lock', 'data_version', 'bench_dataset'];

async function shopTables(knex: Knex): Promise<string[]> {
  const { rows } = await knex.raw<{ rows: { name: string }[] }>(`SELECT tablename AS name FROM pg_tables WHERE schemaname = current_schema() ORDER BY tablename`);
  return rows.map((r) => r.name).filter((name) => !UNTRACKED.includes(name));
}

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE TABLE data_version (
    only_row boolean PRIMARY KEY DEFAULT true CHECK (only_row),
    n bigint NOT NULL
  )`);
  await knex.raw('INSERT INTO data_version (only_row, n) VALUES (true, 1)');
  await knex.raw(`CREATE FUNCTION kp_bump_data_version() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF current_setting('kp.data_version_bumped', true) IS DISTINCT FROM txid_current()::text THEN
        UPDATE data_version SET n = n + 1;
        PERFORM set_config('kp.data_version_bumped', txid_current()::text, true);
      END IF;
      RETURN NULL;
    END $$`);
  for (const table of await shopTables(knex)) {
    await knex.raw(`CREATE CONSTRAINT TRIGGER kp_data_version AFTER INSERT OR UPDATE OR DELETE ON ??
      DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION kp_bump_data_version()`, [table]);
    await knex.raw(`CREATE TRIGGER kp_data_version_truncate AFTER TRUNCATE ON ??
      FOR EACH STATEMENT EXECUTE FUNCTION kp_bump_data_version()`, [table]);
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const table of await shopTables(knex)) {
    await knex.raw('DROP TRIGGER IF EXISTS kp_data_version ON ??', [table]);
    await knex.raw('DROP TRIGGER IF EXISTS kp_data_version_truncate ON ??', [table]);
  }
  await knex.raw('DROP FUNCTION IF EXISTS kp_bump_data_version()');
  await knex.raw('DROP TABLE IF EXISTS data_version');
}
