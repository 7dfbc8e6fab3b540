import { zodResolver } from '@hookform/resolvers/zod';
import { useFieldArray, useForm } from 'react-hook-form';
import { PART_CATEGORIES, partSchema, partUpdateSchema, receiveSchema, type PartInput, type ReceiveInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useAllParts, useCreatePart, useReceive, useSuppliers, useUpdatePart, type PartRow } from './api';

const select = 'min-h-11 rounded-md border border-spruce-700/40 bg-white px-2';

/** Receive a supplier delivery: one delivery note, several lines, booked together. */
export function ReceiveDelivery() {
  const suppliers = useSuppliers();
  const parts = useAllParts();
  const receive = useReceive();
  const toast = useToast();
  const form = useForm<ReceiveInput>({ resolver: zodResolver(receiveSchema) as never, defaultValues: { reference: '', lines: [{ partId: 0, quantity: 1 }] } });
  const lines = useFieldArray({ control: form.control, name: 'lines' });
  const e = form.formState.errors;
  return (
    <form noValidate className="flex flex-col gap-3 rounded-lg bg-white p-4 shadow-sm" onSubmit={form.handleSubmit((input) => receive.mutate(input, {
      onSuccess: (r) => { toast(`Received ${r.units} pieces on ${r.received} lines (${input.reference})`); form.reset({ reference: '', lines: [{ partId: 0, quantity: 1 }] }); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 className="text-xl font-bold text-spruce-900">Receive a delivery</h2>
      <div className="grid gap-3 sm:grid-cols-2">
        <div className="flex flex-col gap-1"><label htmlFor="rcv-supplier" className="font-semibold">Supplier</label>
          <select id="rcv-supplier" className={select} {...form.register('supplierId', { setValueAs: Number })}><option value={0}>Choose…</option>{(suppliers.data ?? []).map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}</select>
          {e.supplierId ? <p className="text-sm font-semibold text-alarm-700">{e.supplierId.message}</p> : null}</div>
        <TextField label="Delivery note number" error={e.reference?.message} {...form.register('reference')} />
      </div>
      {lines.fields.map((f, i) => (
        <div key={f.id} className="grid items-end gap-2 sm:grid-cols-[minmax(0,1fr)_6rem_auto]">
          <div className="flex flex-col gap-1"><label htmlFor={`rcv-part-${i}`} className="font-semibold">Part, line {i + 1}</label>
            <select id={`rcv-part-${i}`} className={select} {...form.register(`lines.${i}.partId`, { setValueAs: Number })}><option value={0}>Choose…</option>{(parts.data ?? []).map((p) => <option key={p.id} value={p.id}>{p.partNumber} — {p.value}</option>)}</select>
            {e.lines?.[i]?.partId ? <p className="text-sm font-semibold text-alarm-700">{e.lines[i]!.partId!.message}</p> : null}</div>
          <TextField label="Quantity" type="number" error={e.lines?.[i]?.quantity?.message} {...form.register(`lines.${i}.quantity`, { valueAsNumber: true })} />
          <Button type="button" variant="quiet" disabled={lines.fields.length === 1} onClick={() => lines.remove(i)}>Remove line</Button>
        </div>
      ))}
      {e.lines?.message ? <p className="text-sm font-semibold text-alarm-700">{e.lines.message}</p> : null}
      <div className="flex gap-2">
        <Button type="button" variant="secondary" onClick={() => lines.append({ partId: 0, quantity: 1 })}>Add a line</Button>
        <Button type="submit" busy={receive.isPending}>Book the delivery</Button>
      </div>
    </form>
  );
}

export function CreatePart() {
  const create = useCreatePart();
  const suppliers = useSuppliers();
  const toast = useToast();
  const blank = { partNumber: '', category: 'resistor' as const, value: '', package: '', manufacturerPartNumber: '', supplierId: null, unitCostCents: 0, leadTimeDays: 7, reorderPoint: 0, binLocation: '', notes: '' };
  const form = useForm<PartInput>({ resolver: zodResolver(partSchema) as never, defaultValues: blank });
  const e = form.formState.errors;
  const n = { valueAsNumber: true };
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-2" onSubmit={form.handleSubmit((input) => create.mutate(input, {
      onSuccess: ({ part }) => { toast(`${part.partNumber} added (no stock yet — receive a delivery)`); form.reset(blank); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 className="text-xl font-bold text-spruce-900 sm:col-span-2">New part</h2>
      <TextField label="Part number" error={e.partNumber?.message} {...form.register('partNumber')} />
      <div className="flex flex-col gap-1"><label htmlFor="part-category" className="font-semibold">Category</label>
        <select id="part-category" className={select} {...form.register('category')}>{PART_CATEGORIES.map((c) => <option key={c} value={c}>{c}</option>)}</select></div>
      <TextField label="Value" hint="e.g. 10 kΩ 1 % 0.25 W" error={e.value?.message} {...form.register('value')} />
      <TextField label="Package" error={e.package?.message} {...form.register('package')} />
      <TextField label="Manufacturer part number" error={e.manufacturerPartNumber?.message} {...form.register('manufacturerPartNumber')} />
      <div className="flex flex-col gap-1"><label htmlFor="part-supplier" className="font-semibold">Supplier</label>
        <select id="part-supplier" className={select} {...form.register('supplierId', { setValueAs: (v) => (Number(v) > 0 ? Number(v) : null) })}><option value={0}>None</option>{(suppliers.data ?? []).map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}</select></div>
      <TextField label="Unit cost in cents" type="number" error={e.unitCostCents?.message} {...form.register('unitCostCents', n)} />
      <TextField label="Lead time (days)" type="number" error={e.leadTimeDays?.message} {...form.register('leadTimeDays', n)} />
      <TextField label="Reorder point" type="number" error={e.reorderPoint?.message} {...form.register('reorderPoint', n)} />
      <TextField label="Bin" error={e.binLocation?.message} {...form.register('binLocation')} />
      <div><Button type="submit" busy={create.isPending}>Add part</Button></div>
    </form>
  );
}

/** Edit a part's catalogue data; stock is never edited here (it is the movement ledger). */
export function EditPart({ part }: { part: PartRow }) {
  const update = useUpdatePart(part.id);
  const suppliers = useSuppliers();
  const toast = useToast();
  const form = useForm<Partial<PartInput>>({
    resolver: zodResolver(partUpdateSchema) as never,
    defaultValues: { value: part.value, package: part.package, manufacturerPartNumber: part.manufacturerPartNumber, supplierId: part.supplierId, unitCostCents: part.unitCostCents, leadTimeDays: part.leadTimeDays, reorderPoint: part.reorderPoint, binLocation: part.binLocation, notes: part.notes },
  });
  const e = form.formState.errors;
  const n = { valueAsNumber: true };
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-4" onSubmit={form.handleSubmit((input) => update.mutate(input, {
      onSuccess: () => toast(`${part.partNumber} saved`),
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 className="text-xl font-bold text-spruce-900 sm:col-span-4">Edit part</h2>
      <TextField label="Value" error={e.value?.message} {...form.register('value')} />
      <TextField label="Package" error={e.package?.message} {...form.register('package')} />
      <TextField label="Manufacturer part number" error={e.manufacturerPartNumber?.message} {...form.register('manufacturerPartNumber')} />
      <div className="flex flex-col gap-1"><label htmlFor="edit-supplier" className="font-semibold">Supplier</label>
        <select id="edit-supplier" className={select} {...form.register('supplierId', { setValueAs: (v) => (Number(v) > 0 ? Number(v) : null) })}><option value={0}>None</option>{(suppliers.data ?? []).map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}</select></div>
      <TextField label="Unit cost in cents" type="number" error={e.unitCostCents?.message} {...form.register('unitCostCents', n)} />
      <TextField label="Lead time (days)" type="number" error={e.leadTimeDays?.message} {...form.register('leadTimeDays', n)} />
      <TextField label="Reorder point" type="number" error={e.reorderPoint?.message} {...form.register('reorderPoint', n)} />
      <TextField label="Bin" error={e.binLocation?.message} {...form.register('binLocation')} />
      <div><Button type="submit" busy={update.isPending}>Save part</Button></div>
    </form>
  );
}
