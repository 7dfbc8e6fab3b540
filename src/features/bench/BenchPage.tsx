import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { Link } from 'react-router';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useBenchQueue, type BenchRow } from './api';
import { MainsCaution } from './MainsCaution';

export default function BenchPage() {
  const queue = useBenchQueue();
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<BenchRow, unknown>[]>(() => [
    { accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <Link to={`/bench/${row.original.id}`} className="inline-flex min-h-11 items-center whitespace-nowrap font-mono font-semibold text-spruce-800 underline">{row.original.serial}</Link> },
    { accessorKey: 'modelName', header: 'Pedal', cell: ({ row }) => `${row.original.modelName} — ${row.original.optionName}` },
    { accessorKey: 'assemblerName', header: 'Built by', cell: ({ row }) => row.original.assemblerName ?? '—' },
    { accessorKey: 'builtAt', header: 'Built', cell: ({ row }) => fmt.dateTime(row.original.builtAt) },
  ], [fmt]);
  return (
    <>
      <PageHeader title="Test bench" />
      <MainsCaution />
      {queue.isPending ? <Loading /> : queue.isError ? <ErrorState error={queue.error} retry={() => queue.refetch()} />
        : queue.data.length === 0 ? <EmptyState title="No units waiting for test">Built units appear here for their bench test.</EmptyState>
        : <DataTable data={queue.data} columns={columns} caption="Units waiting for test" />}
    </>
  );
}
