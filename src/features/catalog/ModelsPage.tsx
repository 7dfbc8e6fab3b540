import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router';
import { modelSchema, type ModelInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useCreateModel, useModels, type ModelListRow } from './api';

function CreateModel() {
  const create = useCreateModel();
  const toast = useToast();
  const navigate = useNavigate();
  const form = useForm<ModelInput>({ resolver: zodResolver(modelSchema) as never, defaultValues: { name: '', sku: '', description: '', basePriceCents: 0, published: false } });
  const e = form.formState.errors;
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm md:grid-cols-4" onSubmit={form.handleSubmit((input) => create.mutate(input, {
      onSuccess: ({ model }) => { toast(`${model.name} created with an empty revision 1`); navigate(`/catalog/models/${model.id}`); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 className="text-xl font-bold text-spruce-900 md:col-span-4">New pedal model</h2>
      <TextField label="Name" error={e.name?.message} {...form.register('name')} />
      <TextField label="SKU" hint="e.g. HM-ABC" error={e.sku?.message} {...form.register('sku')} />
      <TextField label="Base price in cents" type="number" error={e.basePriceCents?.message} {...form.register('basePriceCents', { valueAsNumber: true })} />
      <div className="self-end"><Button type="submit" busy={create.isPending}>Create model</Button></div>
    </form>
  );
}

export default function ModelsPage() {
  const models = useModels();
  const { money } = useFormatters();
  const role = useSession().data?.role;
  const columns = useMemo<ColumnDef<ModelListRow, unknown>[]>(() => [
    { accessorKey: 'name', header: 'Model', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold underline" to={`/catalog/models/${row.original.id}`}>{row.original.name}</Link> },
    { accessorKey: 'sku', header: 'SKU' },
    { accessorKey: 'basePriceCents', header: 'Base price', cell: ({ row }) => money(row.original.basePriceCents) },
    { id: 'revision', header: 'Active revision', cell: ({ row }) => (row.original.activeRevision ? `${row.original.activeRevision.number} of ${row.original.revisionCount}${row.original.activeRevision.frozen ? ' (frozen)' : ''}` : 'none') },
    { id: 'cost', header: 'Unit cost', cell: ({ row }) => (row.original.cost ? money(row.original.cost.totalCents) : '—') },
    { id: 'options', header: 'Clipping options', cell: ({ row }) => `${row.original.options.filter((o) => o.published).length} published of ${row.original.options.length}` },
    { id: 'flags', header: 'Stock', cell: ({ row }) => { const n = row.original.options.filter((o) => o.flags.length).length; return n ? <span className="font-semibold text-alarm-700">⚠ {n} option{n > 1 ? 's' : ''} not buildable</span> : 'ready'; } },
    { accessorKey: 'published', header: 'Published', cell: ({ row }) => (row.original.published ? 'yes' : 'no') },
  ], [money]);
  return (
    <>
      <PageHeader title="Pedal models" />
      <div className="flex flex-col gap-8">
        {models.isPending ? <Loading /> : models.isError ? <ErrorState error={models.error} retry={() => models.refetch()} /> : models.data.length === 0 ? <EmptyState title="No pedal models yet" /> : (
          <DataTable data={models.data} columns={columns} caption="Pedal models" />
        )}
        {role === 'owner' || role === 'planner' ? <CreateModel /> : null}
      </div>
    </>
  );
}
