import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import type { SortDirection } from '../../../shared/schemas/list';
import type { BatchListQuery } from '../../../shared/schemas/production';
import { Link } from 'react-router';
import { BATCH_STATE_LABELS, BATCH_STATES } from '../../../shared/production/states';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useBatches, type BatchRow } from './api';
import { AssemblersPanel } from './AssemblersPanel';
import { NewBatchForm } from './NewBatchForm';

export default function PlanningPage() {
  const [state, setState] = useState<'' | BatchListQuery['state']>('');
  const [search, setSearch] = useState('');
  const [view, setView] = useState<{ sort: BatchListQuery['sort']; dir: SortDirection; page: number }>({ sort: 'number', dir: 'desc', page: 1 });
  const batches = useBatches({ ...view, state: state || undefined, q: search.trim() || undefined, pageSize: 25 });
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<BatchRow, unknown>[]>(() => [
    { id: 'number', accessorKey: 'label', header: 'Batch', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold text-spruce-800 underline" to={`/planning/${row.original.id}`}>{row.original.label}</Link> },
    { id: 'modelName', accessorKey: 'modelName', header: 'Model', cell: ({ row }) => `${row.original.modelName} · rev. ${row.original.revisionNumber}` },
    { accessorKey: 'units', header: 'Units', enableSorting: false },
    { id: 'state', accessorKey: 'state', header: 'State', cell: ({ row }) => BATCH_STATE_LABELS[row.original.state] },
    { accessorKey: 'releasedAt', header: 'Released', enableSorting: false, cell: ({ row }) => (row.original.releasedAt ? fmt.dateTime(row.original.releasedAt) : '—') },
  ], [fmt]);
  return (
    <>
      <PageHeader title="Batches" />
      <div className="grid gap-8">
        <NewBatchForm />
        <AssemblersPanel />
        <section aria-labelledby="batches-heading">
          <h2 id="batches-heading" className="mb-3 text-xl font-bold text-spruce-900">All batches</h2>
          <div className="mb-3 flex flex-wrap items-end gap-4">
            <label className="flex flex-col gap-1 font-semibold">Search
              <input type="search" value={search} placeholder="B0042 or model name" onChange={(e) => { setSearch(e.target.value); setView((v) => ({ ...v, page: 1 })); }} className="min-h-11 rounded-md border border-spruce-700/40 px-3 font-normal" />
            </label>
            <label className="flex flex-col gap-1 font-semibold">State
              <select value={state} onChange={(e) => { setState(e.target.value as typeof state); setView((v) => ({ ...v, page: 1 })); }} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal">
                <option value="">Any state</option>
                {BATCH_STATES.map((s) => <option key={s} value={s}>{BATCH_STATE_LABELS[s]}</option>)}
              </select>
            </label>
          </div>
          {batches.isPending ? <Loading /> : batches.isError ? <ErrorState error={batches.error} retry={() => batches.refetch()} />
            : batches.data.total === 0 ? <EmptyState title={state || search ? 'No batches match' : 'No batches yet'}>{state || search ? 'Clear the search or the state.' : 'Plan the first one above from paid orders and stock targets.'}</EmptyState>
            : <DataTable data={batches.data.items} columns={columns} caption="Batches" server={{
                sort: view.sort, dir: view.dir, page: batches.data, noun: ['batch', 'batches'],
                onSort: (sort, dir) => setView({ sort: sort as BatchListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
              }} />}
        </section>
      </div>
    </>
  );
}
