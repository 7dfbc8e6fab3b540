import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useState } from 'react';
import type { Page, SortDirection } from '../../../shared/schemas/list';
import { Button } from './Button';

/** A list the server pages and sorts: the table shows one page and asks the server for others. */
export interface ServerListing {
  sort: string;
  dir: SortDirection;
  onSort: (sort: string, dir: SortDirection) => void;
  page: Page<unknown>;
  onPage: (page: number) => void;
  /** What one row is called, for "120 orders · page 2 of 5". */
  noun?: [singular: string, plural: string];
}

interface Props<T> {
  data: T[];
  columns: ColumnDef<T, unknown>[];
  caption: string;
  rowClassName?: (row: T) => string;
  /** Set for server-paged lists: sorting and paging go to the server (column ids are its sort keys). */
  server?: ServerListing;
}

/**
 * Every data table goes through TanStack Table. Without `server` it sorts small lists on the
 * client; with it, a header click asks the server for that sort and a pager walks the pages.
 */
export function DataTable<T>({ data, columns, caption, rowClassName, server }: Props<T>) {
  const [localSorting, setLocalSorting] = useState<SortingState>([]);
  const sorting: SortingState = server ? [{ id: server.sort, desc: server.dir === 'desc' }] : localSorting;
  // TanStack Table returns fresh functions each render by design; the compiler lint cannot know that.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data, columns, state: { sorting }, getCoreRowModel: getCoreRowModel(),
    ...(server
      ? {
          manualSorting: true, enableSortingRemoval: false,
          onSortingChange: (next) => {
            const s = (typeof next === 'function' ? next(sorting) : next)[0];
            if (s) server.onSort(s.id, s.desc ? 'desc' : 'asc');
          },
        }
      : { onSortingChange: setLocalSorting, getSortedRowModel: getSortedRowModel() }),
  });
  return (
    <div className="flex flex-col gap-2">
      <div className="overflow-x-auto rounded-lg border border-spruce-700/20 bg-white">
        <table className="w-full border-collapse text-left">
          <caption className="sr-only">{caption}</caption>
          <thead className="bg-spruce-100 text-spruce-900">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  return (
                    <th key={header.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined} className="px-3 py-2 font-semibold">
                      {header.column.getCanSort() ? (
                        <button type="button" className="min-h-11 font-semibold" onClick={header.column.getToggleSortingHandler()}>
                          {flexRender(header.column.columnDef.header, header.getContext())}
                          <span aria-hidden> {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}</span>
                        </button>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-t border-spruce-700/10 ${rowClassName?.(row.original) ?? ''}`}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-middle">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {server ? <Pager listing={server} label={caption} /> : null}
    </div>
  );
}

/** "120 orders · page 2 of 5" with previous and next; past the count cap, "1000+ orders · page 2 of 40+". */
export function Pager({ listing, label }: { listing: ServerListing; label: string }) {
  const { page, pageSize, total, totalCapped } = listing.page;
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const [one, many] = listing.noun ?? ['row', 'rows'];
  const more = totalCapped ? '+' : '';
  return (
    <nav aria-label={`${label}: pages`} className="flex flex-wrap items-center gap-3">
      <span role="status">{total}{more} {total === 1 && !totalCapped ? one : many} · page {page} of {pages}{more}</span>
      <Button type="button" variant="quiet" disabled={page <= 1} onClick={() => listing.onPage(page - 1)}>Previous page</Button>
      <Button type="button" variant="quiet" disabled={page >= pages && !totalCapped} onClick={() => listing.onPage(page + 1)}>Next page</Button>
    </nav>
  );
}
