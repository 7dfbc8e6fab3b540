import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useParams } from 'react-router';
import { MOVEMENT_KINDS, movementSchema, type MovementInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useAddMovement, usePart, type Movement } from './api';
import { EditPart } from './PartForms';

const KIND_HELP: Record<(typeof MOVEMENT_KINDS)[number], string> = {
  receive: 'Received (adds to on hand)', adjust: 'Count correction (+ or −)', reserve: 'Reserve for a batch', release: 'Release a reservation',
  consume: 'Used (takes from on hand)', return: 'Returned to stock',
};

function MovementForm({ partId }: { partId: number }) {
  const add = useAddMovement(partId);
  const toast = useToast();
  const blank = { kind: 'adjust' as const, quantity: 0, reason: '', reference: '' };
  const form = useForm<MovementInput>({ resolver: zodResolver(movementSchema) as never, defaultValues: blank });
  const e = form.formState.errors;
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-4" onSubmit={form.handleSubmit((input) => add.mutate(input, {
      onSuccess: (r) => { toast(`Recorded: ${input.kind} ${input.quantity}. Available now ${r.stock.available}`); form.reset(blank); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 className="text-xl font-bold text-spruce-900 sm:col-span-4">Record a stock movement</h2>
      <div className="flex flex-col gap-1"><label htmlFor="mv-kind" className="font-semibold">What happened</label>
        <select id="mv-kind" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('kind')}>{MOVEMENT_KINDS.map((k) => <option key={k} value={k}>{KIND_HELP[k]}</option>)}</select></div>
      <TextField label="Quantity" type="number" error={e.quantity?.message} {...form.register('quantity', { valueAsNumber: true })} />
      <TextField label="Reason" error={e.reason?.message} {...form.register('reason')} />
      <TextField label="Reference" hint="delivery note, count sheet…" error={e.reference?.message} {...form.register('reference')} />
      <div><Button type="submit" busy={add.isPending}>Record movement</Button></div>
    </form>
  );
}

export default function PartPage() {
  const id = Number(useParams().id);
  const part = usePart(id);
  const { money, dateTime } = useFormatters();
  const role = useSession().data?.role;
  const columns = useMemo<ColumnDef<Movement, unknown>[]>(() => [
    { accessorKey: 'created_at', header: 'When', cell: ({ row }) => dateTime(row.original.created_at) },
    { accessorKey: 'kind', header: 'Movement' },
    { accessorKey: 'quantity', header: 'Quantity' },
    { accessorKey: 'on_hand_delta', header: 'On hand ±' },
    { accessorKey: 'reserved_delta', header: 'Reserved ±' },
    { accessorKey: 'reason', header: 'Reason' },
    { accessorKey: 'reference', header: 'Reference' },
    { accessorKey: 'user_name', header: 'By' },
  ], [dateTime]);
  if (part.isPending) return <Loading />;
  if (part.isError) return <ErrorState error={part.error} retry={() => part.refetch()} />;
  const p = part.data;
  return (
    <>
      <PageHeader title={`${p.partNumber} — ${p.value}`}>
        <Link to="/catalog/parts" className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">All parts</Link>
        <a href={`/api/stock/movements.csv?partId=${p.id}`} className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold">Export movements (CSV)</a>
      </PageHeader>
      <div className="flex flex-col gap-6">
        {p.lowStock ? <Notice tone="alarm">Below its reorder point: {p.available} available, reorder at {p.reorderPoint}. Lead time {p.leadTimeDays} days from {p.supplierName ?? 'no supplier set'}.</Notice> : null}
        <dl className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-4">
          <div><dt className="text-sm text-ink-soft">On hand</dt><dd className="text-2xl font-bold">{p.onHand}</dd></div>
          <div><dt className="text-sm text-ink-soft">Reserved</dt><dd className="text-2xl font-bold">{p.reserved}</dd></div>
          <div><dt className="text-sm text-ink-soft">Available</dt><dd className="text-2xl font-bold">{p.available}</dd></div>
          <div><dt className="text-sm text-ink-soft">Unit cost · bin</dt><dd className="text-2xl font-bold">{money(p.unitCostCents)} · {p.binLocation || '—'}</dd></div>
          <div className="sm:col-span-4"><dt className="text-sm text-ink-soft">Category · package · manufacturer part number</dt><dd>{p.category} · {p.package || '—'} · {p.manufacturerPartNumber || '—'}</dd></div>
        </dl>
        {role === 'owner' || role === 'planner' ? <><MovementForm partId={p.id} /><EditPart key={p.id} part={p} /></> : null}
        <section><h2 className="mb-3 text-xl font-bold text-spruce-900">Movement history</h2>
          {p.movements.length ? <DataTable data={p.movements} columns={columns} caption={`Stock movements of ${p.partNumber}`} /> : <EmptyState title="No movements yet" />}</section>
      </div>
    </>
  );
}
