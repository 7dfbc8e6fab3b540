import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router';
import { modelUpdateSchema, PHOTO_MAX_BYTES, type ModelInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { designPath } from '../../lib/navigation';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { shopFormat, useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useActivateRevision, useCreateOption, useDevices, useModel, useStartRevision, useUpdateModel, useUploadPhoto, type ModelDetail, type OptionView, type RevisionSummary } from './api';
import { OptionForm } from './OptionForm';

function ModelForm({ model }: { model: ModelDetail }) {
  const update = useUpdateModel(model.id);
  const photo = useUploadPhoto(model.id);
  const toast = useToast();
  const form = useForm<Partial<ModelInput>>({ resolver: zodResolver(modelUpdateSchema) as never, defaultValues: { name: model.name, sku: model.sku, description: model.description, basePriceCents: model.basePriceCents, published: model.published } });
  const e = form.formState.errors;
  return (
    <section className="grid gap-4 rounded-lg bg-white p-4 shadow-sm md:grid-cols-[1fr_14rem]">
      <form noValidate className="grid gap-3 md:grid-cols-2" onSubmit={form.handleSubmit((input) => update.mutate(input, {
        onSuccess: () => toast(`${input.name} saved${input.published ? ' — customers can see it' : ' — hidden from customers'}`),
        onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
      }))}>
        <TextField label="Name" error={e.name?.message} {...form.register('name')} />
        <TextField label="SKU" error={e.sku?.message} {...form.register('sku')} />
        <TextField label="Base price in cents" type="number" error={e.basePriceCents?.message} {...form.register('basePriceCents', { valueAsNumber: true })} />
        <label className="flex min-h-11 items-center gap-3 self-end font-semibold"><input type="checkbox" className="size-6" {...form.register('published')} /> Published</label>
        <div className="flex flex-col gap-1 md:col-span-2">
          <label htmlFor="model-description" className="font-semibold">Short description</label>
          <textarea id="model-description" rows={2} className="rounded-md border border-spruce-700/40 p-2" {...form.register('description')} />
        </div>
        <div><Button type="submit" busy={update.isPending}>Save model</Button></div>
      </form>
      <div className="flex flex-col gap-2">
        {model.photoUrl ? <img src={model.photoUrl} alt={`Photo of ${model.name}`} className="aspect-square w-full rounded-md object-cover" /> : <div className="flex aspect-square items-center justify-center rounded-md bg-paper-dark text-ink-soft">No photo yet</div>}
        <label className="flex min-h-11 cursor-pointer items-center justify-center rounded-md border border-spruce-700/40 font-semibold">
          {photo.isPending ? 'Uploading…' : 'Upload a photo'}
          <input type="file" accept="image/png,image/jpeg,image/webp" className="sr-only" onChange={(ev) => {
            const file = ev.target.files?.[0];
            ev.target.value = '';
            if (!file) return;
            if (file.size > PHOTO_MAX_BYTES) { toast(`That photo is ${shopFormat().number(file.size / 1048576, 1)} MB; the limit is ${shopFormat().number(PHOTO_MAX_BYTES / 1048576, 0)} MB`, 'alarm'); return; }
            photo.mutate(file, { onSuccess: () => toast('Photo saved'), onError: (err) => toast(err.message, 'alarm') });
          }} />
        </label>
        <p className="text-sm text-ink-soft">PNG, JPEG or WebP, up to {PHOTO_MAX_BYTES / 1048576} MB.</p>
      </div>
    </section>
  );
}

function Revisions({ model, canEdit }: { model: ModelDetail; canEdit: boolean }) {
  const start = useStartRevision(model.id);
  const activate = useActivateRevision();
  const toast = useToast();
  const navigate = useNavigate();
  const { money, date } = useFormatters();
  const next = Math.max(...model.revisions.map((r) => r.number)) + 1;
  const columns = useMemo<ColumnDef<RevisionSummary, unknown>[]>(() => [
    { accessorKey: 'number', header: 'Revision', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold underline" to={`/catalog/revisions/${row.original.id}`}>Revision {row.original.number}{row.original.label ? ` — ${row.original.label}` : ''}</Link> },
    { id: 'state', header: 'State', cell: ({ row }) => [row.original.active ? 'active' : null, row.original.frozenAt ? `frozen since ${date(row.original.frozenAt)}` : 'editable'].filter(Boolean).join(' · ') },
    { id: 'drive', header: 'Drive stage', cell: ({ row }) => `gain ${row.original.drive.minGain}× to ${row.original.drive.maxGain}×, ${row.original.drive.taper} taper, ${row.original.drive.supplyV} V` },
    { id: 'cost', header: 'Cost (parts + labour)', cell: ({ row }) => (row.original.cost ? money(row.original.cost.totalCents) : '—') },
    {
      id: 'actions', header: () => <span className="sr-only">Actions</span>, enableSorting: false,
      cell: ({ row }) => canEdit ? (
        <div className="flex flex-wrap gap-2">
          <Button variant="secondary" busy={start.isPending} onClick={() => start.mutate(row.original.id, {
            onSuccess: ({ revision }) => { toast(`Revision ${revision.number} started from revision ${row.original.number}`); navigate(`/catalog/revisions/${revision.id}`); },
            onError: (err) => toast(err.message, 'alarm'),
          })}>Start revision {next} from this one</Button>
          {!row.original.active ? <Button variant="quiet" onClick={() => activate.mutate(row.original.id, { onSuccess: () => toast(`Revision ${row.original.number} is now active`), onError: (err) => toast(err.message, 'alarm') })}>Make active</Button> : null}
        </div>
      ) : null,
    },
  ], [activate, canEdit, date, money, navigate, next, start, toast]);
  return <DataTable data={model.revisions} columns={columns} caption={`Revisions of ${model.name}`} />;
}

export default function ModelPage() {
  const id = Number(useParams().id);
  const model = useModel(id);
  const devices = useDevices();
  const create = useCreateOption(id);
  const toast = useToast();
  const navigate = useNavigate();
  const { money } = useFormatters();
  const role = useSession().data?.role;
  const canEdit = role === 'owner' || role === 'planner';
  const columns = useMemo<ColumnDef<OptionView, unknown>[]>(() => [
    { accessorKey: 'name', header: 'Option', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center font-semibold underline" to={`/catalog/models/${id}/options/${row.original.id}`}>{row.original.name} ({row.original.code})</Link> },
    { accessorKey: 'topology', header: 'Topology' },
    { id: 'devices', header: 'Devices (positive / negative)', cell: ({ row }) => `${row.original.positive.map((d) => d.name).join(' + ') || 'none'} / ${row.original.negative.map((d) => d.name).join(' + ') || 'none'}` },
    { accessorKey: 'surchargeCents', header: 'Surcharge', cell: ({ row }) => money(row.original.surchargeCents) },
    { accessorKey: 'costCents', header: 'Unit cost', cell: ({ row }) => (row.original.costCents === null ? '—' : money(row.original.costCents)) },
    { accessorKey: 'published', header: 'Published', cell: ({ row }) => (row.original.published ? 'yes' : 'no') },
    { id: 'flags', header: 'Stock', cell: ({ row }) => (row.original.flags.length ? <span className="font-semibold text-alarm-700">⚠ {row.original.flags.join('; ')}</span> : 'ready') },
  ], [id, money]);
  if (model.isPending) return <Loading />;
  if (model.isError) return <ErrorState error={model.error} retry={() => model.refetch()} />;
  const m = model.data;
  return (
    <>
      <PageHeader title={m.name}>
        <Link to="/catalog/models" className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">All pedal models</Link>
        {m.options.length >= 2 ? <Link to={`/catalog/models/${id}/compare`} className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">Compare options</Link> : null}
        {canEdit && m.activeRevision ? <Link to={designPath(id)} className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">Design an option</Link> : null}
      </PageHeader>
      <div className="flex flex-col gap-8">
        {m.cost ? <Notice>Active revision {m.activeRevision?.number}: parts {money(m.cost.partsCents)} + labour {m.cost.labourMinutes} min at {money(m.labourCentsPerHour)}/h = {money(m.cost.labourCents)} → {money(m.cost.totalCents)} before the clipping devices.</Notice> : null}
        {canEdit ? <ModelForm key={m.id} model={m} /> : null}
        <section><h2 className="mb-3 text-xl font-bold text-spruce-900">Revisions</h2><Revisions model={m} canEdit={canEdit} /></section>
        <section>
          <h2 className="mb-3 text-xl font-bold text-spruce-900">Clipping options</h2>
          {m.options.length ? <DataTable data={m.options} columns={columns} caption={`Clipping options of ${m.name}`} rowClassName={(o) => (o.flags.length ? 'bg-alarm-100' : '')} /> : <EmptyState title="No clipping options yet">Add the first one below.</EmptyState>}
        </section>
        {canEdit ? (
          <section className="rounded-lg bg-white p-4 shadow-sm">
            <h2 className="mb-3 text-xl font-bold text-spruce-900">Add a clipping option</h2>
            {devices.isPending ? <Loading /> : devices.isError ? <ErrorState error={devices.error} /> : (
              <OptionForm devices={devices.data} busy={create.isPending} submitLabel="Add option" onSubmit={(input, form) => create.mutate(input, {
                onSuccess: ({ optionId }) => { toast(`${input.name} added to ${m.name}`); navigate(`/catalog/models/${id}/options/${optionId}`); },
                onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
              })} />
            )}
          </section>
        ) : null}
      </div>
    </>
  );
}
