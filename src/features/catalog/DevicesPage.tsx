import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { forwardVoltage } from '../../../shared/engine/index';
import { customDeviceSchema, DEVICE_KINDS, type CustomDeviceInput } from '../../../shared/schemas/catalog';
import { deviceLook, IvChart } from '../../components/charts';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { shopFormat } from '../../lib/format';
import { useSession } from '../auth/api';
import { useAllParts, useCreateDevice, useDevices, useLinkDevice, type Device } from './api';
import { amps, mV, ohms } from './units';

// I–V points from 0.01 mA to 20 mA, spaced so the knee is drawn smoothly.
const CURRENTS_MA = Array.from({ length: 40 }, (_, i) => 0.01 * Math.pow(2000, i / 39));
const ivPoints = (d: Device) => CURRENTS_MA.map((ma) => ({ v: forwardVoltage({ is: d.is, n: d.n, rs: d.rs, eg: d.eg, xti: d.xti }, ma / 1000), ma }));

function NewDevice() {
  const create = useCreateDevice();
  const toast = useToast();
  const blank = { name: '', kind: 'led' as const, source: 'datasheet' as const, rs: 0, partId: null, provenance: '', points: [{ vf: 0, currentMa: 1 }, { vf: 0, currentMa: 10 }, { vf: 0, currentMa: 20 }] };
  const form = useForm<CustomDeviceInput>({ resolver: zodResolver(customDeviceSchema) as never, defaultValues: blank });
  const source = useWatch({ control: form.control, name: 'source' });
  const e = form.formState.errors;
  const n = { valueAsNumber: true };
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-3" onSubmit={form.handleSubmit((input) => {
      // An empty third point means "fit IS and N only".
      const points = input.points?.filter((p) => p.vf > 0);
      create.mutate({ ...input, points: input.source === 'datasheet' ? points : undefined }, {
        onSuccess: ({ device }) => { toast(`${device.name} added: Vf ${mV(device.vfAt1mA)} at 1 mA, ${mV(device.vfAt10mA)} at 10 mA`); form.reset(blank); },
        onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
      });
    })}>
      <h2 className="text-xl font-bold text-spruce-900 sm:col-span-3">Add a custom device</h2>
      <TextField label="Device name" error={e.name?.message} {...form.register('name')} />
      <div className="flex flex-col gap-1"><label htmlFor="dev-kind" className="font-semibold">Kind</label>
        <select id="dev-kind" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('kind')}>{DEVICE_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}</select></div>
      <div className="flex flex-col gap-1"><label htmlFor="dev-source" className="font-semibold">From</label>
        <select id="dev-source" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('source')}><option value="datasheet">Datasheet points (fitted)</option><option value="spice">SPICE parameters</option></select></div>
      {source === 'spice' ? (
        <>
          <TextField label="IS (A)" type="number" step="any" hint="e.g. 2.52e-9" error={e.is?.message} {...form.register('is', n)} />
          <TextField label="N" type="number" step="any" error={e.n?.message} {...form.register('n', n)} />
          <TextField label="RS (Ω)" type="number" step="any" error={e.rs?.message} {...form.register('rs', n)} />
        </>
      ) : [0, 1, 2].map((i) => (
        <div key={i} className="grid grid-cols-2 gap-2">
          <TextField label={`Vf ${i + 1} (V)`} type="number" step="any" hint={i === 2 ? 'optional: fits RS' : undefined} error={e.points?.[i]?.vf?.message} {...form.register(`points.${i}.vf`, n)} />
          <TextField label={`at (mA)`} type="number" step="any" error={e.points?.[i]?.currentMa?.message} {...form.register(`points.${i}.currentMa`, n)} />
        </div>
      ))}
      {e.points?.message ? <p className="text-sm font-semibold text-alarm-700 sm:col-span-3">{e.points.message}</p> : null}
      <div className="sm:col-span-3"><Button type="submit" busy={create.isPending}>Add device</Button></div>
    </form>
  );
}

export default function DevicesPage() {
  const devices = useDevices();
  const parts = useAllParts();
  const link = useLinkDevice();
  const toast = useToast();
  const role = useSession().data?.role;
  const canEdit = role === 'owner' || role === 'planner';
  // Which devices are drawn: the first five until someone ticks or unticks a box.
  const [picked, setPicked] = useState<number[] | null>(null);
  const shown = useMemo(() => picked ?? (devices.data ?? []).slice(0, 5).map((d) => d.deviceId), [picked, devices.data]);
  const columns = useMemo<ColumnDef<Device, unknown>[]>(() => [
    { accessorKey: 'name', header: 'Device', cell: ({ row }) => <span className="font-semibold">{row.original.name}{row.original.presetKey ? '' : ' (custom)'}</span> },
    { accessorKey: 'kind', header: 'Kind' },
    { accessorKey: 'vfAt1mA', header: 'Vf at 1 mA', cell: ({ row }) => <span className="whitespace-nowrap">{mV(row.original.vfAt1mA)}</span> },
    { accessorKey: 'vfAt10mA', header: 'Vf at 10 mA', cell: ({ row }) => <span className="whitespace-nowrap">{mV(row.original.vfAt10mA)}</span> },
    { id: 'spice', header: 'IS · N · RS', cell: ({ row }) => <span className="font-mono text-sm">{amps(row.original.is)} · {shopFormat().number(row.original.n, 3)} · {ohms(row.original.rs)}</span> },
    {
      id: 'part', header: 'Stocked as',
      cell: ({ row }) => canEdit ? (
        <select aria-label={`Part stocked for ${row.original.name}`} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" value={row.original.partId ?? 0}
          onChange={(e) => link.mutate({ id: row.original.deviceId, partId: Number(e.target.value) || null }, { onSuccess: ({ device }) => toast(device.partNumber ? `${device.name} is stocked as ${device.partNumber}` : `${device.name} is no longer linked to a part`), onError: (err) => toast(err.message, 'alarm') })}>
          <option value={0}>not linked</option>
          {(parts.data ?? []).filter((p) => p.category === 'diode' || p.category === 'led').map((p) => <option key={p.id} value={p.id}>{p.partNumber}</option>)}
        </select>
      ) : row.original.partNumber ?? 'not linked',
    },
    { id: 'stock', header: 'Available', cell: ({ row }) => (row.original.partId ? row.original.available : <span className="font-semibold text-alarm-700">no part</span>) },
    { id: 'chart', header: 'On the chart', enableSorting: false, cell: ({ row }) => (
      <label className="flex min-h-11 items-center gap-2">
        <input type="checkbox" className="size-6" aria-label={`Show ${row.original.name} on the chart`} checked={shown.includes(row.original.deviceId)}
          onChange={(e) => setPicked(e.target.checked ? [...shown, row.original.deviceId].slice(-6) : shown.filter((s) => s !== row.original.deviceId))} />
        <span aria-hidden="true" className="inline-block h-1 w-6 rounded" style={{ background: deviceLook(row.original).colour }} /> show
      </label>
    ) },
  ], [canEdit, link, parts.data, shown, toast]);
  if (devices.isPending) return <Loading />;
  if (devices.isError) return <ErrorState error={devices.error} retry={() => devices.refetch()} />;
  const chartDevices = devices.data.filter((d) => shown.includes(d.deviceId));
  return (
    <>
      <PageHeader title="Clipping devices" />
      <div className="flex flex-col gap-6">
        {devices.data.length === 0 ? <EmptyState title="No devices yet" /> : <DataTable data={devices.data} columns={columns} caption="Clipping device library" />}
        {chartDevices.length ? (
          <IvChart title="Forward I–V curves at 27 °C" series={chartDevices.map((d) => ({ label: d.name, points: ivPoints(d), ...deviceLook(d) }))} />
        ) : <EmptyState title="No curves drawn">Tick “show” beside up to six devices to draw their curves.</EmptyState>}
        <details className="rounded-lg bg-white p-4 shadow-sm"><summary className="min-h-11 cursor-pointer font-semibold">Where the numbers come from</summary>
          <ul className="mt-2 list-disc pl-6">{devices.data.map((d) => <li key={d.deviceId}><strong>{d.name}:</strong> {d.provenance}</li>)}</ul></details>
        {canEdit ? <NewDevice /> : null}
      </div>
    </>
  );
}
