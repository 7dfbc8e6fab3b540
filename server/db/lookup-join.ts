// One row looked up by its key for each row of a query: `lookupJoin(db, 'users', 'u', ['name'], 'o.customer_id')`
// adds `LEFT JOIN LATERAL (SELECT "name" FROM "users" WHERE "users"."id" = "o"."customer_id" LIMIT 1) AS "u" ON true`.
//
// Why not a plain join: when PostgreSQL over-estimates how many rows a filtered list keeps (open
// orders, an assembler's queue), it hashes the whole joined table instead, and that table grows with
// the shop's history (every customer, every batch). The LIMIT keeps the lookup per row, through the
// primary key, so the cost follows the rows shown. Use it for a few rows that each need one parent;
// keep plain joins for filters and for whole-table reports.
import type { Knex } from 'knex';

type Db = Knex | Knex.Transaction;

/** The join text for a per-row primary-key lookup of `columns` of `table` as `alias` (null columns when the key is null). */
export function lookupJoin(db: Db, table: string, alias: string, columns: readonly string[], key: string): string {
  // Identifiers only (no values), so the text is complete and the same on every call.
  return db.raw('LEFT JOIN LATERAL (SELECT ?? FROM ?? WHERE ?? = ?? LIMIT 1) AS ?? ON true', [[...columns], table, `${table}.id`, key, alias]).toQuery();
}
