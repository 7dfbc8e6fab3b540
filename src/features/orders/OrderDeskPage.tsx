import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router';
import type { z } from 'zod';
import { ORDER_STATE_LABELS, ORDER_STATES, type OrderState } from '../../../shared/order-states';
import type { SortDirection } from '../../../shared/schemas/list';
import { listSearch } from '../../../shared/schemas/list';
import { orderFilterSchema, type OrderFilter } from '../../../shared/schemas/orders';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useFormatters } from '../../lib/format';
import { orderPath } from '../../lib/navigation';
import { useOptionChoices, useOrders, type OrderListRow } from './api';

type FilterForm = z.input<typeof orderFilterSchema>;
const PAGE_SIZE = 25;
// Empty selects and dates mean "any": drop them before the schema sees them.
const clean = (v: Record<string, unknown>) => Object.fromEntries(Object.entries(v).filter(([, x]) => x !== '' && x !== undefined && x !== null));

export default function OrderDeskPage() {
  const [filter, setFilter] = useState<Partial<OrderFilter>>({});
  const [view, setView] = useState<{ sort: OrderFilter['sort']; dir: SortDirection; page: number }>({ sort: 'createdAt', dir: 'desc', page: 1 });
  const orders = useOrders({ ...filter, ...view, pageSize: PAGE_SIZE });
  const options = useOptionChoices();
  const { money, dateTime } = useFormatters();
  const form = useForm<FilterForm, unknown, OrderFilter>({ resolver: (values, ctx, opts) => zodResolver(orderFilterSchema)(clean(values) as FilterForm, ctx, opts) });
  const errors = form.formState.errors;

  const columns = useMemo<ColumnDef<OrderListRow, unknown>[]>(() => [
    { id: 'number', header: 'Order', accessorKey: 'number', cell: ({ row }) => <Link to={orderPath(row.original.id)} className="inline-flex min-h-11 items-center font-semibold whitespace-nowrap text-copper-700 underline">{row.original.number}</Link> },
    { id: 'createdAt', header: 'Placed', accessorKey: 'created_at', cell: ({ getValue }) => dateTime(getValue() as string) },
    { id: 'customerName', header: 'Customer', accessorKey: 'customer_name' },
    { header: 'What', accessorKey: 'summary', enableSorting: false },
    { header: 'Units', accessorKey: 'units', enableSorting: false, cell: ({ getValue }) => <span className="num">{getValue() as number}</span> },
    { id: 'totalCents', header: 'Total', accessorKey: 'total_cents', cell: ({ getValue }) => <span className="num">{money(getValue() as number)}</span> },
    { id: 'state', header: 'Status', accessorKey: 'state', cell: ({ getValue }) => ORDER_STATE_LABELS[getValue() as OrderState] },
  ], [money, dateTime]);

  return (
    <>
      <PageHeader title="Orders">
        {/* The same filters and sort as the table below, every page of it. */}
        <a href={`/api/orders/export.csv${listSearch({ ...filter, sort: view.sort, dir: view.dir })}`} download
          className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold">
          Export these orders (CSV)
        </a>
      </PageHeader>
      <form onSubmit={form.handleSubmit((f) => { const { page: _p, pageSize: _s, sort: _o, dir: _d, ...only } = f; setFilter(only); setView((v) => ({ ...v, page: 1 })); })} noValidate aria-label="Filter orders" className="mb-4 grid gap-3 rounded-lg border border-spruce-700/20 bg-white p-4 md:grid-cols-3 xl:grid-cols-6">
        <label className="flex flex-col gap-1 font-semibold">
          Status
          <select className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal" {...form.register('state')}>
            <option value="">Any status</option>
            {ORDER_STATES.map((s) => <option key={s} value={s}>{ORDER_STATE_LABELS[s]}</option>)}
          </select>
        </label>
        <label className="flex flex-col gap-1 font-semibold xl:col-span-2">
          Clipping option
          <select className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal" {...form.register('optionId')}>
            <option value="">Any option</option>
            {options.data?.map((o) => <option key={o.id} value={o.id}>{o.label}</option>)}
          </select>
        </label>
        <TextField label="Placed from" type="date" error={errors.from?.message} {...form.register('from')} />
        <TextField label="Placed until" type="date" error={errors.to?.message} {...form.register('to')} />
        <TextField label="Search" placeholder="Order number, name, e-mail or serial" hint="A unit's serial finds the order it belongs to" error={errors.q?.message} {...form.register('q')} />
        <div className="flex items-end gap-2 md:col-span-3 xl:col-span-6">
          <Button type="submit">Show orders</Button>
          <Button type="button" variant="quiet" onClick={() => { form.reset({ state: undefined, optionId: undefined, from: '', to: '', q: '' }); setFilter({}); setView((v) => ({ ...v, page: 1 })); }}>Clear filters</Button>
          {orders.isFetching && !orders.isPending ? <span role="status" className="text-ink-soft">Updating…</span> : null}
        </div>
      </form>
      {orders.isPending ? <Loading label="Loading orders…" /> : null}
      {orders.isError ? <ErrorState error={orders.error} retry={() => orders.refetch()} /> : null}
      {orders.data?.total === 0 ? <EmptyState title={Object.keys(filter).length ? 'No orders match these filters' : 'No orders yet'} /> : null}
      {orders.data && orders.data.total > 0 ? (
        <DataTable data={orders.data.items} columns={columns} caption="Orders" server={{
          sort: view.sort, dir: view.dir, page: orders.data, noun: ['order', 'orders'],
          onSort: (sort, dir) => setView({ sort: sort as OrderFilter['sort'], dir, page: 1 }),
          onPage: (page) => setView((v) => ({ ...v, page })),
        }} />
      ) : null}
    </>
  );
}
