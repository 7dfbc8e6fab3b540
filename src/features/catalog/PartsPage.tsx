import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { PART_CATEGORIES } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { usePartsPage, type PartRow, type PartsQuery } from './api';
import { CreatePart, ReceiveDelivery } from './PartForms';

const PAGE_SIZE = 25;

export default function PartsPage() {
  const [search, setSearch] = useState('');
  const [category, setCategory] = useState('');
  const [lowStock, setLowStock] = useState(false);
  const [sorting, setSorting] = useState<SortingState>([{ id: 'partNumber', desc: false }]);
  const [page, setPage] = useState(1);
  const q: PartsQuery = { q: search, category, lowStock, sort: sorting[0]?.id ?? 'partNumber', dir: sorting[0]?.desc ? 'desc' : 'asc', page, pageSize: PAGE_SIZE };
  const parts = usePartsPage(q);
  const { money } = useFormatters();
  const role = useSession().data?.role;
  const canEdit = role === 'owner' || role === 'planner';
  const columns = useMemo<ColumnDef<PartRow, unknown>[]>(() => [
    { id: 'partNumber', header: 'Part number', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold underline" to={`/catalog/parts/${row.original.id}`}>{row.original.partNumber}</Link> },
    { id: 'category', header: 'Category', accessorKey: 'category' },
    { id: 'value', header: 'Value', accessorKey: 'value' },
    { id: 'unitCostCents', header: 'Unit cost', cell: ({ row }) => money(row.original.unitCostCents) },
    { id: 'onHand', header: 'On hand', accessorKey: 'onHand' },
    { id: 'available', header: 'Available', cell: ({ row }) => <span className={row.original.lowStock ? 'font-bold text-alarm-700' : ''}>{row.original.available}{row.original.lowStock ? ' — below reorder point' : ''}</span> },
    { id: 'reorderPoint', header: 'Reorder at', accessorKey: 'reorderPoint' },
    { id: 'binLocation', header: 'Bin', accessorKey: 'binLocation' },
  ], [money]);
  // Sorting and paging happen on the server: the table only renders the page it is given.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: parts.data?.items ?? [], columns, state: { sorting }, manualSorting: true, manualPagination: true, enableSortingRemoval: false,
    onSortingChange: (s) => { setSorting(s); setPage(1); }, getCoreRowModel: getCoreRowModel(),
  });
  const pages = parts.data ? Math.max(1, Math.ceil(parts.data.total / PAGE_SIZE)) : 1;
  const exportQs = new URLSearchParams({ q: search.trim(), category, lowStock: String(lowStock), sort: q.sort, dir: q.dir }).toString();
  return (
    <>
      <PageHeader title="Parts & stock">
        <a href={`/api/parts/export.csv?${exportQs}`} className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold">Export this list (CSV)</a>
        <a href="/api/stock/movements.csv" className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold">Export stock movements (CSV)</a>
      </PageHeader>
      <div className="flex flex-col gap-4">
        <div className="flex flex-wrap items-end gap-4 rounded-lg bg-white p-4 shadow-sm">
          <div className="flex flex-col gap-1"><label htmlFor="parts-search" className="font-semibold">Search</label>
            <input id="parts-search" type="search" value={search} placeholder="part number, value, bin…" onChange={(e) => { setSearch(e.target.value); setPage(1); }} className="min-h-11 rounded-md border border-spruce-700/40 px-3" /></div>
          <div className="flex flex-col gap-1"><label htmlFor="parts-category" className="font-semibold">Category</label>
            <select id="parts-category" value={category} onChange={(e) => { setCategory(e.target.value); setPage(1); }} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2">
              <option value="">All</option>{PART_CATEGORIES.map((c) => <option key={c} value={c}>{c}</option>)}
            </select></div>
          <label className="flex min-h-11 items-center gap-2 font-semibold"><input type="checkbox" className="size-6" checked={lowStock} onChange={(e) => { setLowStock(e.target.checked); setPage(1); }} />
            Only below reorder point{parts.data ? ` (${parts.data.lowStockTotal} in all)` : ''}</label>
        </div>
        {parts.isPending ? <Loading /> : parts.isError ? <ErrorState error={parts.error} retry={() => parts.refetch()} /> : parts.data.total === 0 ? <EmptyState title="No parts match">Clear the search or the filters.</EmptyState> : (
          <div className="overflow-x-auto rounded-lg border border-spruce-700/20 bg-white">
            <table className="w-full border-collapse text-left">
              <caption className="sr-only">Parts with their stock</caption>
              <thead className="bg-spruce-100">{table.getHeaderGroups().map((g) => (
                <tr key={g.id}>{g.headers.map((h) => {
                  const s = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" className="px-3 py-2" aria-sort={s === 'asc' ? 'ascending' : s === 'desc' ? 'descending' : undefined}>
                      <button type="button" className="min-h-11 font-semibold" onClick={h.column.getToggleSortingHandler()}>{flexRender(h.column.columnDef.header, h.getContext())}<span aria-hidden> {s === 'asc' ? '▲' : s === 'desc' ? '▼' : ''}</span></button>
                    </th>
                  );
                })}</tr>
              ))}</thead>
              <tbody>{table.getRowModel().rows.map((row) => (
                <tr key={row.id} className={`border-t border-spruce-700/10 ${row.original.lowStock ? 'bg-alarm-100' : ''}`}>
                  {row.getVisibleCells().map((c) => <td key={c.id} className="px-3 py-2">{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
                </tr>
              ))}</tbody>
            </table>
          </div>
        )}
        {parts.data ? (
          <nav aria-label="Pages" className="flex items-center gap-3">
            <Button variant="secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>Previous page</Button>
            <span>Page {page} of {pages} · {parts.data.total} parts</span>
            <Button variant="secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>Next page</Button>
          </nav>
        ) : null}
        {canEdit ? <div className="grid gap-6 lg:grid-cols-2"><ReceiveDelivery /><CreatePart /></div> : null}
      </div>
    </>
  );
}
