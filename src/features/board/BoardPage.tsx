import type { ColumnDef } from '@tanstack/react-table';
import { Ident } from '../../components/ui/Ident';
import { useMemo } from 'react';
import { Link } from 'react-router';
import { BATCH_STATE_LABELS, UNIT_STATE_LABELS, type UnitState } from '../../../shared/production/states';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useBoard, type Board } from './api';

// Progress by state, in the order a unit moves; colours from the theme, each segment also labelled in words.
const SEGMENTS: { state: UnitState; className: string }[] = [
  { state: 'shipped', className: 'bg-spruce-900' },
  { state: 'in_stock', className: 'bg-spruce-800' },
  { state: 'passed', className: 'bg-good-700' },
  { state: 'built', className: 'bg-spruce-700' },
  { state: 'building', className: 'bg-copper-600' },
  { state: 'rework', className: 'bg-alarm-700' },
  { state: 'waiting', className: 'bg-spruce-100' },
];

function ProgressByState({ units, label }: { units: Board['batches'][number]['units']; label: string }) {
  const total = SEGMENTS.reduce((s, x) => s + (units[x.state] ?? 0), 0);
  const words = SEGMENTS.filter((s) => units[s.state]).map((s) => `${units[s.state]} ${UNIT_STATE_LABELS[s.state].toLowerCase()}`).join(', ');
  return (
    <div>
      <div className="flex h-6 overflow-hidden rounded border border-spruce-700/30" role="img" aria-label={`${label}: ${words || 'no units yet'}`}>
        {total ? SEGMENTS.map((s) => (units[s.state] ? <div key={s.state} className={s.className} style={{ width: `${((units[s.state] ?? 0) / total) * 100}%` }} /> : null)) : null}
      </div>
      <p className="mt-1 text-sm text-ink-soft">{words || 'Not released yet'}</p>
    </div>
  );
}

export default function BoardPage() {
  const board = useBoard();
  const lateColumns = useMemo<ColumnDef<Board['late'][number], unknown>[]>(() => [
    { accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <Ident mono>{row.original.serial}</Ident> },
    { accessorKey: 'state', header: 'State', cell: ({ row }) => UNIT_STATE_LABELS[row.original.state] },
    { accessorKey: 'assemblerName', header: 'Builder', cell: ({ row }) => row.original.assemblerName ?? 'unassigned' },
    { accessorKey: 'plannedDate', header: 'Planned', cell: ({ row }) => row.original.plannedDate ?? '—' },
    { accessorKey: 'orderNumber', header: 'Order', cell: ({ row }) => row.original.orderNumber ?? 'stock' },
  ], []);
  const shortColumns = useMemo<ColumnDef<Board['shortages'][number], unknown>[]>(() => [
    { accessorKey: 'batch', header: 'Batch' },
    { accessorKey: 'partNumber', header: 'Part', cell: ({ row }) => <span className="font-mono text-sm">{row.original.partNumber}</span> },
    { accessorKey: 'description', header: 'What' },
    { accessorKey: 'shortage', header: 'Short' },
    { accessorKey: 'supplier', header: 'Supplier', cell: ({ row }) => row.original.supplier ?? '—' },
  ], []);
  const wipColumns = useMemo<ColumnDef<Board['wip'][number], unknown>[]>(() => [
    { accessorKey: 'name', header: 'Assembler' },
    { accessorKey: 'building', header: 'On the bench' },
    { accessorKey: 'waiting', header: 'Queued' },
    { accessorKey: 'rework', header: 'Rework' },
  ], []);
  return (
    <>
      <PageHeader title="Production board">
        <Link to="/planning" className="inline-flex min-h-11 items-center rounded-md bg-copper-600 px-4 font-semibold text-white">Plan a batch</Link>
        <Link to="/shipping" className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold">Shipping</Link>
      </PageHeader>
      {board.isPending ? <Loading /> : board.isError ? <ErrorState error={board.error} retry={() => board.refetch()} /> : (
        <div className="grid gap-8">
          <section aria-labelledby="live-heading">
            <h2 id="live-heading" className="mb-3 text-xl font-bold text-spruce-900">Batches in progress</h2>
            {board.data.batches.length === 0 ? <EmptyState title="No batches in production">Batches you plan show here with their progress, late units and shortages.</EmptyState> : (
              <ul className="grid gap-4 md:grid-cols-2">
                {board.data.batches.map((b) => (
                  <li key={b.id} className="rounded-lg bg-white p-4 shadow-sm">
                    <Link to={`/planning/${b.id}`} className="inline-flex min-h-11 items-center text-lg font-bold text-spruce-800 underline">{b.label} · {b.modelName} rev. {b.revisionNumber}</Link>
                    <p className="mb-2 text-sm">{BATCH_STATE_LABELS[b.state]}</p>
                    <ProgressByState units={b.units} label={`Batch ${b.label}`} />
                  </li>
                ))}
              </ul>
            )}
          </section>
          <section aria-labelledby="wip-heading"><h2 id="wip-heading" className="mb-3 text-xl font-bold text-spruce-900">Work per assembler</h2><DataTable data={board.data.wip} columns={wipColumns} caption="Work in progress per assembler" /></section>
          <section aria-labelledby="late-heading"><h2 id="late-heading" className="mb-3 text-xl font-bold text-spruce-900">Late units</h2>
            {board.data.late.length ? <DataTable data={board.data.late} columns={lateColumns} caption="Late units" /> : <p className="text-good-700">Nothing is behind its planned day or due date.</p>}
          </section>
          <section aria-labelledby="short-heading"><h2 id="short-heading" className="mb-3 text-xl font-bold text-spruce-900">Shortages to chase</h2>
            {board.data.shortages.length ? <DataTable data={board.data.shortages} columns={shortColumns} caption="Shortages" /> : <p className="text-good-700">Every released batch has its parts.</p>}
          </section>
        </div>
      )}
    </>
  );
}
