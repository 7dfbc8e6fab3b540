import type { Knex } from 'knex';
import type { ListParams, Page } from '../../shared/schemas/list';

/**
 * One page of a list query: counts the matches, then fetches the requested page sorted by the
 * endpoint's whitelisted column (the key was checked by the shared schema) with the id as tie
 * breaker, so pages never overlap. `count` is the query without selects or order (filters only).
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
  const [{ n }] = await spec.count.clearSelect().clearOrder().count<{ n: number }[]>('* as n');
  const column = spec.sortColumns[params.sort];
  const rows = (await spec.rows
    .orderBy([{ column, order: params.dir, nulls: params.dir === 'asc' ? 'last' : 'first' }, { column: spec.tieBreak, order: params.dir }])
    .limit(params.pageSize)
    .offset((params.page - 1) * params.pageSize)) as Row[];
  return { items: rows.map(spec.map), total: Number(n), page: params.page, pageSize: params.pageSize };
}

/** A LIKE pattern that matches the text anywhere, with the wildcards in it taken literally. */
export const containsPattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
