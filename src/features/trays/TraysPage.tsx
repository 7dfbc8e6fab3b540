import { zodResolver } from '@hookform/resolvers/zod';
import { shopFormat } from '../../lib/format';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router';
import type { SortDirection } from '../../../shared/schemas/list';
import { createTraySchema, type CreateTrayInput, type TrayListQuery } from '../../../shared/schemas/trays';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { trayPath } from '../../lib/navigation';
import { useDevices } from '../catalog/api';
import { useCreateTray, useTrays, type TrayRow } from './api';

const select = 'min-h-11 rounded-md border border-spruce-700/40 bg-white px-3';

function NewTray() {
  const devices = useDevices();
  const create = useCreateTray();
  const toast = useToast();
  const navigate = useNavigate();
  const today = new Date().toISOString().slice(0, 10);
  const form = useForm<CreateTrayInput>({ resolver: zodResolver(createTraySchema) as never, defaultValues: { deviceId: 0, supplierLot: '', receivedOn: today, notes: '' } });
  const e = form.formState.errors;
  return (
    <form noValidate aria-labelledby="new-tray-heading" className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-4" onSubmit={form.handleSubmit((input) => create.mutate(input, {
      onSuccess: ({ tray }) => { toast(`Tray ${tray.code} started: enter its readings`); void navigate(trayPath(tray.id)); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h2 id="new-tray-heading" className="text-xl font-bold text-spruce-900 sm:col-span-4">New tray</h2>
      <div className="flex flex-col gap-1">
        <label htmlFor="tray-device" className="font-semibold">Device</label>
        <select id="tray-device" className={select} aria-invalid={e.deviceId ? true : undefined} aria-describedby={e.deviceId ? 'tray-device-error' : undefined}
          {...form.register('deviceId', { setValueAs: (v) => Number(v) })}>
          <option value={0}>Choose…</option>
          {(devices.data ?? []).map((d) => <option key={d.deviceId} value={d.deviceId}>{d.name} ({d.kind})</option>)}
        </select>
        {e.deviceId ? <p id="tray-device-error" className="text-sm font-semibold text-alarm-700">{e.deviceId.message}</p> : null}
      </div>
      <TextField label="Supplier lot" error={e.supplierLot?.message} {...form.register('supplierLot')} />
      <TextField label="Received on" type="date" error={e.receivedOn?.message} {...form.register('receivedOn')} />
      <div className="flex items-end"><Button type="submit" busy={create.isPending}>Start tray</Button></div>
    </form>
  );
}

export default function TraysPage() {
  const [view, setView] = useState<{ sort: TrayListQuery['sort']; dir: SortDirection; page: number }>({ sort: 'receivedOn', dir: 'desc', page: 1 });
  const trays = useTrays({ ...view, pageSize: 25 });
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<TrayRow, unknown>[]>(() => [
    { id: 'id', accessorKey: 'code', header: 'Tray', cell: ({ row }) => <Link to={trayPath(row.original.id)} className="inline-flex min-h-11 items-center font-mono font-semibold text-spruce-800 underline">{row.original.code}</Link> },
    { id: 'deviceName', accessorKey: 'deviceName', header: 'Device' },
    { id: 'supplierLot', accessorKey: 'supplierLot', header: 'Supplier lot' },
    { id: 'receivedOn', accessorKey: 'receivedOn', header: 'Received', cell: ({ row }) => fmt.date(row.original.receivedOn) },
    { accessorKey: 'slots', header: 'Measured', enableSorting: false },
    { accessorKey: 'free', header: 'Free', enableSorting: false },
    { accessorKey: 'meanVf', header: 'Mean Vf', enableSorting: false, cell: ({ row }) => (row.original.meanVf === null ? '—' : `${shopFormat().number(row.original.meanVf, 4)} V`) },
  ], [fmt]);
  return (
    <>
      <PageHeader title="Device trays" />
      <p className="mb-4 max-w-3xl text-ink-soft">A tray is one supplier lot of one clipping device, measured slot by slot at the bench test current. Batches take matched pairs from here.</p>
      <div className="grid gap-6">
        <NewTray />
        {trays.isPending ? <Loading /> : trays.isError ? <ErrorState error={trays.error} retry={() => trays.refetch()} />
          : trays.data.total === 0 ? <EmptyState title="No trays yet">Start a tray above when a lot of diodes or LEDs arrives.</EmptyState>
          : <DataTable data={trays.data.items} columns={columns} caption="Trays" server={{
              sort: view.sort, dir: view.dir, page: trays.data, noun: ['tray', 'trays'],
              onSort: (sort, dir) => setView({ sort: sort as TrayListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
            }} />}
      </div>
    </>
  );
}
