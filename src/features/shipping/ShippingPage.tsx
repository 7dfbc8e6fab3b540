import type { ColumnDef } from '@tanstack/react-table';
import { Ident } from '../../components/ui/Ident';
import { useMemo, useState } from 'react';
import type { SortDirection } from '../../../shared/schemas/list';
import { SHIPPING_STATES, type ShipmentListQuery, type ShippingListQuery } from '../../../shared/schemas/production';
import { ORDER_STATE_LABELS } from '../../../shared/order-states';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { printUrls, useFulfilFromStock, useMarkDelivered, useShipments, useShipping, useToFinishedStock, type Shipment, type ShippingOrder } from './api';
import { ShipForm } from './ShipForm';

const PAGE_SIZE = 20;
type View<S> = { sort: S; dir: SortDirection; page: number };

export default function ShippingPage() {
  const [state, setState] = useState<'' | ShippingListQuery['state']>('');
  const [view, setView] = useState<View<ShippingListQuery['sort']>>({ sort: 'dueAt', dir: 'asc', page: 1 });
  const [shipView, setShipView] = useState<View<ShipmentListQuery['sort']>>({ sort: 'shippedAt', dir: 'desc', page: 1 });
  const [onTheirWay, setOnTheirWay] = useState(false);
  const queue = useShipping({ ...view, state: state || undefined, pageSize: PAGE_SIZE });
  const shipments = useShipments({ ...shipView, delivered: onTheirWay ? false : undefined, pageSize: PAGE_SIZE });
  const delivered = useMarkDelivered();
  const toStock = useToFinishedStock();
  const fromStock = useFulfilFromStock();
  const toast = useToast();
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<ShippingOrder, unknown>[]>(() => [
    { id: 'number', accessorKey: 'number', header: 'Order', cell: ({ row }) => <span className="font-semibold"><Ident>{row.original.number}</Ident></span> },
    { id: 'customerName', accessorKey: 'customerName', header: 'Customer', cell: ({ row }) => <>{row.original.customerName}<br /><span className="text-sm text-ink-soft">{row.original.destination}</span></> },
    { accessorKey: 'passed', header: 'Units passed', enableSorting: false, cell: ({ row }) => `${row.original.passed} of ${row.original.ordered}` },
    { id: 'dueAt', accessorKey: 'dueAt', header: 'Due', cell: ({ row }) => (row.original.dueAt ? fmt.date(row.original.dueAt) : '—') },
    { id: 'state', accessorKey: 'state', header: 'State', cell: ({ row }) => ORDER_STATE_LABELS[row.original.state] },
    {
      id: 'action', header: 'Next', enableSorting: false,
      cell: ({ row }) => (row.original.state === 'ready' ? <ShipForm order={row.original} /> : <span className="text-ink-soft">Ships when every unit has passed</span>),
    },
  ], [fmt]);
  const shipmentColumns = useMemo<ColumnDef<Shipment, unknown>[]>(() => [
    { id: 'number', accessorKey: 'orderNumber', header: 'Order', cell: ({ row }) => <span className="font-semibold">{row.original.orderNumber}</span> },
    { id: 'customerName', accessorKey: 'customerName', header: 'Customer', cell: ({ row }) => <>{row.original.customerName}<br /><span className="text-sm text-ink-soft">{row.original.destination}</span></> },
    {
      id: 'carrier', accessorKey: 'carrier', header: 'Carrier',
      cell: ({ row }) => (
        <>{row.original.carrier} <span className="font-mono">{row.original.trackingNumber}</span>
          {row.original.trackingUrl ? <><br /><a href={row.original.trackingUrl} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center underline">Track {row.original.trackingNumber}</a></> : null}
        </>
      ),
    },
    { id: 'shippedAt', accessorKey: 'shippedAt', header: 'Shipped', cell: ({ row }) => fmt.date(row.original.shippedAt) },
    {
      id: 'action', header: 'Delivery', enableSorting: false,
      cell: ({ row }) => {
        const s = row.original;
        return (
          <div className="flex flex-wrap items-center gap-2">
            {s.packingSlipUrl ? <a href={s.packingSlipUrl} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center underline">Packing slip (PDF)</a> : null}
            <a href={printUrls.addressLabel(s.orderId, '4x6')} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center underline" aria-label={`Address label for ${s.orderNumber} (PDF)`}>Address label</a>
            {s.deliveredAt ? <span className="text-good-700">Delivered {fmt.date(s.deliveredAt)}</span> : (
              <ConfirmButton variant="secondary" label="Mark delivered" question={`Has ${s.customerName} received order ${s.orderNumber}?`} confirmLabel="Yes, delivered"
                onConfirm={() => delivered.mutate(s.id, { onSuccess: () => toast(`Order ${s.orderNumber} marked delivered`), onError: (e) => toast(e.message, 'alarm') })} />
            )}
          </div>
        );
      },
    },
  ], [fmt, delivered, toast]);
  return (
    <>
      <PageHeader title="Shipping" />
      <p className="mb-4 text-ink-soft">Battery and power-supply notes follow the destination’s rules: no batteries are packed; each slip states the pedal’s supply and polarity.</p>
      {queue.isPending ? <Loading /> : queue.isError ? <ErrorState error={queue.error} retry={() => queue.refetch()} /> : (
        <div className="grid gap-8">
          <section aria-labelledby="to-ship-heading" className="grid gap-3">
            <div className="flex flex-wrap items-end justify-between gap-3">
              <h2 id="to-ship-heading" className="text-xl font-bold text-spruce-900">Orders on their way</h2>
              <label className="flex flex-col gap-1 font-semibold">Show
                <select value={state} onChange={(e) => { setState(e.target.value as typeof state); setView((v) => ({ ...v, page: 1 })); }} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal">
                  <option value="">Scheduled, in production and ready</option>
                  {SHIPPING_STATES.map((s) => <option key={s} value={s}>{ORDER_STATE_LABELS[s]}</option>)}
                </select>
              </label>
            </div>
            {queue.data.orders.total ? (
              <DataTable data={queue.data.orders.items} columns={columns} caption="Orders in production or ready to ship" server={{
                sort: view.sort, dir: view.dir, page: queue.data.orders, noun: ['order', 'orders'],
                onSort: (sort, dir) => setView({ sort: sort as ShippingListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
              }} />
            ) : <EmptyState title="No orders to ship">Orders appear here once they are scheduled into a batch.</EmptyState>}
          </section>
          <section aria-labelledby="shipments-heading" className="grid gap-3">
            <div className="flex flex-wrap items-end justify-between gap-3">
              <h2 id="shipments-heading" className="text-xl font-bold text-spruce-900">Recent shipments</h2>
              <label className="flex min-h-11 items-center gap-2 font-semibold"><input type="checkbox" className="size-6" checked={onTheirWay}
                onChange={(e) => { setOnTheirWay(e.target.checked); setShipView((v) => ({ ...v, page: 1 })); }} />Only those not yet delivered</label>
            </div>
            {shipments.isPending ? <Loading /> : shipments.isError ? <ErrorState error={shipments.error} retry={() => shipments.refetch()} /> : shipments.data.total ? (
              <DataTable data={shipments.data.items} columns={shipmentColumns} caption="Shipments" server={{
                sort: shipView.sort, dir: shipView.dir, page: shipments.data, noun: ['shipment', 'shipments'],
                onSort: (sort, dir) => setShipView({ sort: sort as ShipmentListQuery['sort'], dir, page: 1 }), onPage: (page) => setShipView((v) => ({ ...v, page })),
              }} />
            ) : <EmptyState title="No shipments">Shipped orders appear here, newest first.</EmptyState>}
          </section>
          <section aria-labelledby="stock-heading">
            <h2 id="stock-heading" className="mb-2 text-xl font-bold text-spruce-900">Passed stock builds</h2>
            {queue.data.finishedStock.length ? (
              <ul className="grid gap-2">{queue.data.finishedStock.map((u) => (
                <li key={u.id} className="flex flex-wrap items-center gap-3"><Ident mono>{u.serial}</Ident> {u.modelName} — {u.optionName}
                  {u.state === 'passed' ? <Button variant="secondary" busy={toStock.isPending} onClick={() => toStock.mutate(u.id, { onSuccess: () => toast(`${u.serial} is in finished stock`), onError: (e) => toast(e.message, 'alarm') })}>Put in finished stock</Button> : <span className="text-good-700">in finished stock</span>}
                </li>))}</ul>
            ) : <p className="text-ink-soft">No passed stock builds.</p>}
          </section>
          {queue.data.fromStock.length ? (
            <section aria-labelledby="from-stock-heading">
              <h2 id="from-stock-heading" className="mb-2 text-xl font-bold text-spruce-900">Paid orders finished stock can fulfil</h2>
              <ul className="grid gap-2">{queue.data.fromStock.map((l) => (
                <li key={l.orderLineId} className="flex flex-wrap items-center gap-3">Order {l.orderNumber}: {l.quantity} × {l.description}
                  <Button variant="secondary" busy={fromStock.isPending} onClick={() => fromStock.mutate(l.orderLineId, {
                    onSuccess: (r) => toast(`Order ${l.orderNumber} takes ${r.serials.join(', ')} from finished stock${r.orderState === 'ready' ? ': ready to ship' : ''}`),
                    onError: (e) => toast(e.message, 'alarm'),
                  })}>Fulfil {l.orderNumber} from stock</Button>
                </li>))}</ul>
            </section>
          ) : null}
        </div>
      )}
    </>
  );
}
