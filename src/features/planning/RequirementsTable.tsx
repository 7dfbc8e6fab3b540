import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { DataTable } from '../../components/ui/DataTable';
import type { Requirement } from './api';

/** The exploded BOM against stock: what the batch needs, what is free, and what is short. */
export function RequirementsTable({ rows, released }: { rows: Requirement[]; released: boolean }) {
  const columns = useMemo<ColumnDef<Requirement, unknown>[]>(() => [
    { accessorKey: 'partNumber', header: 'Part', cell: ({ row }) => <span className="font-mono text-sm">{row.original.partNumber}</span> },
    { accessorKey: 'description', header: 'What' },
    { accessorKey: 'supplier', header: 'Supplier', cell: ({ row }) => row.original.supplier ?? '—' },
    { accessorKey: 'baseQuantity', header: 'Base BOM' },
    { accessorKey: 'optionQuantity', header: 'Option parts' },
    { accessorKey: 'required', header: released ? 'Still to kit' : 'Needed' },
    ...(released ? [{ accessorKey: 'reservedForBatch', header: 'Held for batch' } as ColumnDef<Requirement, unknown>] : []),
    { accessorKey: 'available', header: 'Free in stock' },
    {
      accessorKey: 'shortage', header: 'Short',
      cell: ({ row }) => (row.original.shortage > 0 ? <strong className="text-alarm-700">{row.original.shortage} short · {row.original.leadTimeDays} d lead</strong> : <span className="text-good-700">covered</span>),
    },
  ], [released]);
  return <DataTable data={rows} columns={columns} caption="Parts for this batch" rowClassName={(r) => (r.shortage > 0 ? 'bg-alarm-100/60' : '')} />;
}
