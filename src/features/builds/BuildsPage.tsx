import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { UNIT_STATE_LABELS } from '../../../shared/production/states';
import { SerialBox } from '../../components/serials/SerialBox';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useSession } from '../auth/api';
import type { BuildListQuery } from '../../../shared/schemas/production';
import { useMyBuilds, type BuildRow } from './api';
import { shopFormat } from '../../lib/format';

/** The assembler's own queue, rework first, then what is on the bench, then by planned day. */
export default function BuildsPage() {
  const [view, setView] = useState<{ sort: BuildListQuery['sort']; dir: 'asc' | 'desc'; page: number }>({ sort: 'queue', dir: 'asc', page: 1 });
  const builds = useMyBuilds(view);
  const { data: user } = useSession();
  const columns = useMemo<ColumnDef<BuildRow, unknown>[]>(() => [
    { id: 'queue', accessorKey: 'queueRank', header: 'Build order', cell: ({ row }) => <span className="num">{row.original.queueRank}</span> },
    { accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <Link to={`/builds/${row.original.id}`} className="inline-flex min-h-11 items-center whitespace-nowrap font-mono font-semibold text-spruce-800 underline">{row.original.serial}</Link> },
    { id: 'modelName', accessorKey: 'modelName', header: 'Pedal', cell: ({ row }) => `${row.original.modelName} — ${row.original.optionName}` },
    {
      accessorKey: 'plannedDate', header: 'Planned day',
      cell: ({ row }) => (
        <span className="whitespace-nowrap">
          {row.original.plannedDate ? shopFormat().date(row.original.plannedDate) : '—'}
          {/* The planned day is already beside it; a passed due date is named. */}
          {row.original.late ? <strong className="ml-2 rounded bg-alarm-700 px-2 py-0.5 text-sm text-white">Late{row.original.late.startsWith('order') ? ` · ${row.original.late}` : ''}</strong> : null}
        </span>
      ),
    },
    { accessorKey: 'stepsDone', header: 'Steps', enableSorting: false, cell: ({ row }) => `${row.original.stepsDone} of ${row.original.steps}` },
    { accessorKey: 'state', header: 'State', enableSorting: false, cell: ({ row }) => `${UNIT_STATE_LABELS[row.original.state]}${row.original.kitted ? '' : ' · waiting for its kit'}` },
  ], []);
  return (
    <>
      <PageHeader title="My builds" />
      <SerialBox to={(u) => `/builds/${u.id}`} />
      {builds.data?.items.some((b) => b.late) ? <p role="status" className="mb-3 font-semibold text-alarm-700">{builds.data.items.filter((b) => b.late).length} of the builds on this page are late: they are marked below.</p> : null}
      {builds.isPending ? <Loading /> : builds.isError ? <ErrorState error={builds.error} retry={() => builds.refetch()} />
        : builds.data.total === 0 ? <EmptyState title={`Nothing assigned to you yet${user ? `, ${user.name.split(' ')[0]}` : ''}`}>Units assigned to you appear here in build order.</EmptyState>
        : <DataTable data={builds.data.items} columns={columns} caption="My builds" rowClassName={(r) => (r.late ? 'bg-alarm-100/70' : r.state === 'rework' ? 'bg-amber-400/20' : '')} server={{
            sort: view.sort, dir: view.dir, page: builds.data, noun: ['unit', 'units'],
            onSort: (sort, dir) => setView({ sort: sort as BuildListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
          }} />}
    </>
  );
}
