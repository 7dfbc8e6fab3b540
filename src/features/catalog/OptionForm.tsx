import { zodResolver } from '@hookform/resolvers/zod';
import { Controller, useForm, useWatch } from 'react-hook-form';
import { optionSchema, type OptionInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { useFormatters } from '../../lib/format';
import type { Device, OptionView } from './api';
import { mV } from './units';

const MAX_IN_SERIES = 3;

function StringPicker({ label, value, onChange, devices, error }: { label: string; value: number[]; onChange: (v: number[]) => void; devices: Device[]; error?: string }) {
  const slots = Array.from({ length: MAX_IN_SERIES }, (_, i) => value[i] ?? 0);
  return (
    <fieldset className="flex flex-col gap-2 rounded-md border border-spruce-700/30 p-3">
      <legend className="px-1 font-semibold">{label}</legend>
      {slots.map((id, i) => (
        <select
          key={i}
          aria-label={`${label}, device ${i + 1}`}
          className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2"
          value={id}
          onChange={(e) => {
            const next = [...slots];
            next[i] = Number(e.target.value);
            onChange(next.filter((n) => n > 0));
          }}
        >
          <option value={0}>{i === 0 ? '— none —' : '— no more in series —'}</option>
          {devices.map((d) => <option key={d.deviceId} value={d.deviceId}>{d.name} (Vf {mV(d.vfAt1mA)} at 1 mA)</option>)}
        </select>
      ))}
      {error ? <p className="text-sm font-semibold text-alarm-700">{error}</p> : null}
    </fieldset>
  );
}

/** Create or edit a clipping option: devices from the library, network values in everyday units. */
export function OptionForm({ devices, initial, onSubmit, busy, submitLabel }: {
  devices: Device[]; initial?: OptionView; busy: boolean; submitLabel: string;
  onSubmit: (input: OptionInput, form: ReturnType<typeof useForm<OptionInput>>) => void;
}) {
  const { money } = useFormatters();
  const form = useForm<OptionInput>({
    resolver: zodResolver(optionSchema) as never,
    defaultValues: initial ? {
      code: initial.code, name: initial.name, description: initial.description, topology: initial.topology === 'feedback' ? 'feedback' : 'shunt',
      network: initial.network, positive: initial.positive.map((d) => d.deviceId), negative: initial.negative.map((d) => d.deviceId),
      surchargeCents: initial.surchargeCents, published: initial.published,
    } : { code: '', name: '', description: '', topology: 'shunt', network: { seriesOhms: 2200 }, positive: [], negative: [], surchargeCents: 0, published: false },
  });
  const e = form.formState.errors;
  const topology = useWatch({ control: form.control, name: 'topology' });
  const surcharge = Number(useWatch({ control: form.control, name: 'surchargeCents' })) || 0;
  const num = { setValueAs: (v: string) => (v === '' ? undefined : Number(v)) };
  return (
    <form noValidate onSubmit={form.handleSubmit((input) => onSubmit(input, form))} className="grid gap-4 md:grid-cols-2">
      <TextField label="Name" error={e.name?.message} {...form.register('name')} />
      <TextField label="Code" hint="Short, in serials and SKUs, e.g. SI2" error={e.code?.message} {...form.register('code')} />
      <div className="flex flex-col gap-1 md:col-span-2">
        <label htmlFor="option-description" className="font-semibold">What the customer reads</label>
        <textarea id="option-description" rows={2} className="rounded-md border border-spruce-700/40 bg-white p-2" {...form.register('description')} />
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="option-topology" className="font-semibold">Topology</label>
        <select id="option-topology" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('topology')}>
          <option value="shunt">Shunt — hard, devices to ground after a series resistor</option>
          <option value="feedback">Feedback — soft, devices across the feedback resistor</option>
        </select>
      </div>
      {topology === 'shunt' ? (
        <div className="grid grid-cols-2 gap-2">
          <TextField label="Series resistor (Ω)" type="number" error={e.network?.seriesOhms?.message} {...form.register('network.seriesOhms', num)} />
          <TextField label="Shunt capacitor (F)" type="number" step="any" hint="e.g. 1e-8 for 10 nF; empty for none" error={e.network?.shuntFarads?.message} {...form.register('network.shuntFarads', num)} />
        </div>
      ) : (
        <div className="grid grid-cols-3 gap-2">
          <TextField label="Feedback resistor (Ω)" type="number" error={e.network?.feedbackOhms?.message} {...form.register('network.feedbackOhms', num)} />
          <TextField label="Ground resistor (Ω)" type="number" error={e.network?.groundOhms?.message} {...form.register('network.groundOhms', num)} />
          <TextField label="Feedback capacitor (F)" type="number" step="any" hint="e.g. 4.7e-11 for 47 pF" error={e.network?.feedbackFarads?.message} {...form.register('network.feedbackFarads', num)} />
        </div>
      )}
      <Controller control={form.control} name="positive" render={({ field }) => <StringPicker label="Positive string" devices={devices} value={field.value ?? []} onChange={field.onChange} error={e.positive?.message} />} />
      <Controller control={form.control} name="negative" render={({ field }) => <StringPicker label="Negative string" devices={devices} value={field.value ?? []} onChange={field.onChange} error={e.negative?.message} />} />
      <TextField label="Surcharge in cents" type="number" hint={`Customers pay ${money(surcharge)} on top of the base price`} error={e.surchargeCents?.message} {...form.register('surchargeCents', { valueAsNumber: true })} />
      <label className="flex min-h-11 items-center gap-3 font-semibold">
        <input type="checkbox" className="size-6" {...form.register('published')} /> Published (customers can choose it)
      </label>
      <div className="md:col-span-2"><Button type="submit" busy={busy}>{submitLabel}</Button></div>
    </form>
  );
}
