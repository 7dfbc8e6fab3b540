import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router';
import { BATCH_STATE_LABELS } from '../../../shared/production/states';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useBatches, type BatchRow } from './api';
import { AssemblersPanel } from './AssemblersPanel';
import { NewBatchForm } from './NewBatchForm';

export default function PlanningPage() {
  const batches = useBatches();
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<BatchRow, unknown>[]>(() => [
    { accessorKey: 'label', header: 'Batch', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold text-spruce-800 underline" to={`/planning/${row.original.id}`}>{row.original.label}</Link> },
    { accessorKey: 'modelName', header: 'Model', cell: ({ row }) => `${row.original.modelName} · rev. ${row.original.revisionNumber}` },
    { accessorKey: 'units', header: 'Units' },
    { accessorKey: 'state', header: 'State', cell: ({ row }) => BATCH_STATE_LABELS[row.original.state] },
    { accessorKey: 'releasedAt', header: 'Released', cell: ({ row }) => (row.original.releasedAt ? fmt.dateTime(row.original.releasedAt) : '—') },
  ], [fmt]);
  return (
    <>
      <PageHeader title="Batches" />
      <div className="grid gap-8">
        <NewBatchForm />
        <AssemblersPanel />
        <section aria-labelledby="batches-heading">
          <h2 id="batches-heading" className="mb-3 text-xl font-bold text-spruce-900">All batches</h2>
          {batches.isPending ? <Loading /> : batches.isError ? <ErrorState error={batches.error} retry={() => batches.refetch()} />
            : batches.data.length === 0 ? <EmptyState title="No batches yet">Plan the first one above from paid orders and stock targets.</EmptyState>
            : <DataTable data={batches.data} columns={columns} caption="Batches" />}
        </section>
      </div>
    </>
  );
}
