import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import type { SortDirection } from '../../../shared/schemas/list';
import type { BenchListQuery } from '../../../shared/schemas/production';
import { Link } from 'react-router';
import { SerialBox } from '../../components/serials/SerialBox';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useBenchQueue, type BenchRow } from './api';
import { MainsCaution } from './MainsCaution';

export default function BenchPage() {
  const [view, setView] = useState<{ sort: BenchListQuery['sort']; dir: SortDirection; page: number }>({ sort: 'builtAt', dir: 'asc', page: 1 });
  const queue = useBenchQueue({ ...view, pageSize: 25 });
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<BenchRow, unknown>[]>(() => [
    { id: 'serial', accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <Link to={`/bench/${row.original.id}`} className="inline-flex min-h-11 items-center whitespace-nowrap font-mono font-semibold text-spruce-800 underline">{row.original.serial}</Link> },
    { id: 'modelName', accessorKey: 'modelName', header: 'Pedal', cell: ({ row }) => `${row.original.modelName} — ${row.original.optionName}` },
    { accessorKey: 'assemblerName', header: 'Built by', enableSorting: false, cell: ({ row }) => row.original.assemblerName ?? '—' },
    { id: 'builtAt', accessorKey: 'builtAt', header: 'Built', cell: ({ row }) => fmt.dateTime(row.original.builtAt) },
  ], [fmt]);
  return (
    <>
      <PageHeader title="Test bench" />
      <MainsCaution />
      <SerialBox to={(u) => `/bench/${u.id}`} />
      {queue.isPending ? <Loading /> : queue.isError ? <ErrorState error={queue.error} retry={() => queue.refetch()} />
        : queue.data.total === 0 ? <EmptyState title="No units waiting for test">Built units appear here for their bench test.</EmptyState>
        : <DataTable data={queue.data.items} columns={columns} caption="Units waiting for test" server={{
            sort: view.sort, dir: view.dir, page: queue.data, noun: ['unit', 'units'],
            onSort: (sort, dir) => setView({ sort: sort as BenchListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
          }} />}
    </>
  );
}
