import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router';
import { bomLineSchema, driveStageSchema, type BomLineInput, type DriveStageInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useAddBomLine, useAllParts, useDeleteBomLine, useRevision, useStartRevision, useUpdateRevision, type BomLine, type Revision } from './api';
import { BomCsvUpload } from './BomCsvUpload';
import { BuildSteps } from './BuildSteps';
import { EditBomLine } from './EditDialogs';

function DriveForm({ revision, editable }: { revision: Revision; editable: boolean }) {
  const update = useUpdateRevision(revision.id);
  const toast = useToast();
  const form = useForm<DriveStageInput>({ resolver: zodResolver(driveStageSchema) as never, defaultValues: { label: revision.label, ...revision.drive, supplyV: revision.drive.supplyV as 9 | 18 } });
  const e = form.formState.errors;
  const n = { valueAsNumber: true };
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-3" onSubmit={form.handleSubmit((input) => update.mutate(input, {
      onSuccess: () => toast('Drive stage saved'), onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <fieldset disabled={!editable} className="contents">
        <TextField label="Label" error={e.label?.message} {...form.register('label')} />
        <TextField label="Minimum gain (×)" type="number" step="any" error={e.minGain?.message} {...form.register('minGain', n)} />
        <TextField label="Maximum gain (×)" type="number" step="any" error={e.maxGain?.message} {...form.register('maxGain', n)} />
        <div className="flex flex-col gap-1">
          <label htmlFor="drive-taper" className="font-semibold">Drive pot taper</label>
          <select id="drive-taper" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('taper')}><option value="audio">audio (A)</option><option value="linear">linear (B)</option></select>
        </div>
        <TextField label="Input level, peak (V)" type="number" step="any" hint="0.1 V = 100 mV, a typical single-coil pickup" error={e.inputPeakV?.message} {...form.register('inputPeakV', n)} />
        <div className="flex flex-col gap-1">
          <label htmlFor="drive-supply" className="font-semibold">Supply</label>
          <select id="drive-supply" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('supplyV', { setValueAs: Number })}><option value={9}>9 V DC</option><option value={18}>18 V DC</option></select>
        </div>
        <TextField label="Reference drive (0–1)" type="number" step="0.05" hint="Where THD is quoted and tolerance bands are read" error={e.referenceDrive?.message} {...form.register('referenceDrive', n)} />
      </fieldset>
      {editable ? <div className="self-end"><Button type="submit" busy={update.isPending}>Save drive stage</Button></div> : null}
    </form>
  );
}

function AddLine({ revisionId }: { revisionId: number }) {
  const parts = useAllParts();
  const add = useAddBomLine(revisionId);
  const toast = useToast();
  const form = useForm<BomLineInput>({ resolver: zodResolver(bomLineSchema) as never, defaultValues: { quantity: 1, designators: '', notes: '', needsLot: false } });
  const e = form.formState.errors;
  return (
    <form noValidate className="grid items-start gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-5" onSubmit={form.handleSubmit((input) => add.mutate(input, {
      onSuccess: () => { toast('BOM line added'); form.reset({ quantity: 1, designators: '', notes: '', needsLot: false }); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <div className="flex flex-col gap-1 sm:col-span-2">
        <label htmlFor="line-part" className="font-semibold">Part</label>
        <select id="line-part" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('partId', { setValueAs: Number })}>
          <option value={0}>Choose a part…</option>
          {(parts.data ?? []).map((p) => <option key={p.id} value={p.id}>{p.partNumber} — {p.value}</option>)}
        </select>
        {e.partId ? <p className="text-sm font-semibold text-alarm-700">{e.partId.message}</p> : null}
      </div>
      <TextField label="Quantity" type="number" error={e.quantity?.message} {...form.register('quantity', { valueAsNumber: true })} />
      <TextField label="Designators" hint="e.g. R7 R8" error={e.designators?.message} {...form.register('designators')} />
      <div className="self-end"><Button type="submit" busy={add.isPending}>Add line</Button></div>
    </form>
  );
}

export default function RevisionPage() {
  const id = Number(useParams().id);
  const revision = useRevision(id);
  const role = useSession().data?.role;
  const canEdit = role === 'owner' || role === 'planner';
  const remove = useDeleteBomLine();
  const start = useStartRevision(revision.data?.modelId ?? 0);
  const toast = useToast();
  const navigate = useNavigate();
  const { money, date } = useFormatters();
  const r = revision.data;
  const editable = canEdit && !!r && !r.frozen;
  const columns = useMemo<ColumnDef<BomLine, unknown>[]>(() => [
    { accessorKey: 'designators', header: 'Designators' },
    { accessorKey: 'partNumber', header: 'Part number', cell: ({ row }) => <Link className="inline-flex min-h-11 items-center underline" to={`/catalog/parts/${row.original.partId}`}>{row.original.partNumber}</Link> },
    { accessorKey: 'value', header: 'Value' },
    { accessorKey: 'quantity', header: 'Qty' },
    { id: 'cost', header: 'Line cost', cell: ({ row }) => money(row.original.quantity * row.original.unitCostCents) },
    { accessorKey: 'available', header: 'Available', cell: ({ row }) => <span className={row.original.available < row.original.quantity ? 'font-semibold text-alarm-700' : ''}>{row.original.available}</span> },
    { accessorKey: 'notes', header: 'Notes' },
    {
      id: 'actions', header: () => <span className="sr-only">Actions</span>, enableSorting: false,
      cell: ({ row }) => editable ? <div className="flex gap-2"><EditBomLine line={row.original} /><ConfirmButton label="Remove" question={`Remove ${row.original.partNumber} ${row.original.designators} from this BOM?`} confirmLabel="Remove line"
        onConfirm={() => remove.mutate(row.original.id, { onSuccess: () => toast(`${row.original.partNumber} removed`), onError: (err) => toast(err.message, 'alarm') })} /></div> : null,
    },
  ], [editable, money, remove, toast]);
  if (revision.isPending) return <Loading />;
  if (revision.isError || !r) return <ErrorState error={revision.error} retry={() => revision.refetch()} />;
  return (
    <>
      <PageHeader title={`${r.modelName} — revision ${r.number}`}>
        <Link to={`/catalog/models/${r.modelId}`} className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">Back to {r.modelName}</Link>
      </PageHeader>
      <div className="flex flex-col gap-6">
        {r.frozen ? (
          <div className="flex flex-wrap items-center gap-4 rounded-md border border-amber-400 bg-copper-100 p-4">
            <p className="font-semibold">Frozen since {date(r.frozenAt!)}: a released batch was built from this revision, so it stays as it was.</p>
            {canEdit ? <Button busy={start.isPending} onClick={() => start.mutate(r.id, {
              onSuccess: ({ revision: created }) => { toast(`Revision ${created.number} started from revision ${r.number}`); navigate(`/catalog/revisions/${created.id}`); },
              onError: (err) => toast(err.message, 'alarm'),
            })}>Start revision {r.nextNumber} from this one</Button> : null}
          </div>
        ) : null}
        <Notice>{r.active ? 'Active revision. ' : 'Not the active revision. '}Parts {money(r.cost.partsCents)} + labour {r.cost.labourMinutes} min at {money(r.labourCentsPerHour)}/h ({money(r.cost.labourCents)}) = {money(r.cost.totalCents)} per unit, before the clipping devices.</Notice>
        <section><h2 className="mb-3 text-xl font-bold text-spruce-900">Drive stage</h2><DriveForm key={r.id} revision={r} editable={editable} /></section>
        <section className="flex flex-col gap-3">
          <h2 className="text-xl font-bold text-spruce-900">Bill of materials ({r.lines.length} lines)</h2>
          {r.lines.length ? <DataTable data={r.lines} columns={columns} caption={`BOM of revision ${r.number}`} /> : <EmptyState title="No BOM lines yet">Add lines one by one or upload a CSV.</EmptyState>}
          {editable ? <><AddLine revisionId={r.id} /><BomCsvUpload revisionId={r.id} /></> : null}
        </section>
        <BuildSteps revision={r} editable={editable} />
      </div>
    </>
  );
}
