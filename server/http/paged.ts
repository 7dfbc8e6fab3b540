import type { Knex } from 'knex';
import { COUNT_CAP, type ListParams, type Page } from '../../shared/schemas/list';

/**
 * One page of a list query: counts the matches, then fetches the requested page sorted by the
 * endpoint's whitelisted column (the key was checked by the shared schema) with the id as tie
 * breaker, so pages never overlap. `count` is the query without selects or order (filters only);
 * it reads at most COUNT_CAP + 1 rows (`cappedCount`), so a count costs the same on five years of
 * history as on one.
 */
export async function paged<Row, Item, S extends string>(
  params: ListParams<S>,
  spec: {
    count: Knex.QueryBuilder;
    rows: Knex.QueryBuilder;
    sortColumns: Record<S, string>;
    tieBreak: string;
    map: (row: Row) => Item;
  },
): Promise<Page<Item>> {
  const { total, totalCapped } = await cappedCount(spec.count);
  const column = spec.sortColumns[params.sort];
  const rows = (await spec.rows
    .orderBy([{ column, order: params.dir, nulls: params.dir === 'asc' ? 'last' : 'first' }, { column: spec.tieBreak, order: params.dir }])
    // Written into the SQL, not bound: with a bound LIMIT PostgreSQL cannot cost a generic plan well,
    // so it would plan these joins again on every request (see server/db/prepared.ts).
    .limit(params.pageSize, { skipBinding: true })
    .offset((params.page - 1) * params.pageSize, { skipBinding: true })) as Row[];
  return { items: rows.map(spec.map), total, totalCapped, page: params.page, pageSize: params.pageSize };
}

/** How many rows the query matches, counting at most COUNT_CAP + 1 of them. */
export async function cappedCount(query: Knex.QueryBuilder): Promise<{ total: number; totalCapped: boolean }> {
  const matches = query.clearSelect().clearOrder().select(query.client.raw('1')).limit(COUNT_CAP + 1, { skipBinding: true });
  const [{ n }] = (await query.client.queryBuilder().count({ n: '*' }).from(matches.as('matches'))) as { n: number }[];
  return Number(n) > COUNT_CAP ? { total: COUNT_CAP, totalCapped: true } : { total: Number(n), totalCapped: false };
}

/** A LIKE pattern that matches the text anywhere, with the wildcards in it taken literally. */
export const containsPattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
