import knexFactory, { type Knex } from 'knex';
import pg from 'pg';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { usePreparedStatements } from './prepared';

// COUNT(*) and SUM() come back as strings by default; numbers are what we use.
pg.types.setTypeParser(20, (value) => Number(value));

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

/** Migration and seed folders, shared by the app, the scripts and the tests. */
export const migrationConfig: Knex.MigratorConfig = {
  directory: path.join(root, 'migrations'),
  loadExtensions: ['.ts'],
  tableName: 'knex_migrations',
};
export const seedConfig: Knex.SeederConfig = {
  directory: path.join(root, 'seeds'),
  loadExtensions: ['.ts'],
};

/**
 * A knex instance on PostgreSQL; timestamps come back as Date, bigint counts as numbers, and
 * queries with bindings run as named prepared statements (server/db/prepared.ts).
 */
export function createKnex(databaseUrl: string, poolMax = 10): Knex {
  const knex = knexFactory({
    client: 'pg',
    connection: databaseUrl,
    pool: { min: 0, max: poolMax },
  });
  usePreparedStatements(knex);
  return knex;
}
