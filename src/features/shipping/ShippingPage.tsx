import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { ORDER_STATE_LABELS } from '../../../shared/order-states';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useFulfilFromStock, useMarkDelivered, useShipping, useToFinishedStock, type ShippingOrder } from './api';
import { ShipForm } from './ShipForm';

export default function ShippingPage() {
  const queue = useShipping();
  const delivered = useMarkDelivered();
  const toStock = useToFinishedStock();
  const fromStock = useFulfilFromStock();
  const toast = useToast();
  const fmt = useFormatters();
  const columns = useMemo<ColumnDef<ShippingOrder, unknown>[]>(() => [
    { accessorKey: 'number', header: 'Order', cell: ({ row }) => <span className="font-semibold">{row.original.number}</span> },
    { accessorKey: 'customerName', header: 'Customer', cell: ({ row }) => <>{row.original.customerName}<br /><span className="text-sm text-ink-soft">{row.original.destination}</span></> },
    { accessorKey: 'passed', header: 'Units passed', cell: ({ row }) => `${row.original.passed} of ${row.original.ordered}` },
    { accessorKey: 'dueAt', header: 'Due', cell: ({ row }) => (row.original.dueAt ? fmt.date(row.original.dueAt) : '—') },
    { accessorKey: 'state', header: 'State', cell: ({ row }) => ORDER_STATE_LABELS[row.original.state] },
    {
      id: 'action', header: 'Next', enableSorting: false,
      cell: ({ row }) => {
        const o = row.original;
        if (o.state === 'ready') return <ShipForm order={o} />;
        if (o.state === 'shipped' && o.shipment) return (
          <div className="flex flex-wrap items-center gap-2">
            <span>{o.shipment.carrier} <span className="font-mono">{o.shipment.trackingNumber}</span></span>
            <a href={o.shipment.packingSlipUrl} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center underline">Packing slip (PDF)</a>
            <ConfirmButton variant="secondary" label="Mark delivered" question={`Has ${o.customerName} received order ${o.number}?`} confirmLabel="Yes, delivered"
              onConfirm={() => delivered.mutate(o.shipment!.id, { onSuccess: () => toast(`Order ${o.number} marked delivered`), onError: (e) => toast(e.message, 'alarm') })} />
          </div>
        );
        return <span className="text-ink-soft">Ships when every unit has passed</span>;
      },
    },
  ], [fmt, delivered, toast]);
  return (
    <>
      <PageHeader title="Shipping" />
      <p className="mb-4 text-ink-soft">Battery and power-supply notes follow the destination’s rules: no batteries are packed; each slip states the pedal’s supply and polarity.</p>
      {queue.isPending ? <Loading /> : queue.isError ? <ErrorState error={queue.error} retry={() => queue.refetch()} /> : (
        <div className="grid gap-8">
          {queue.data.orders.length ? <DataTable data={queue.data.orders} columns={columns} caption="Orders in production, ready or shipped" /> : <EmptyState title="No orders to ship">Orders appear here once they are scheduled into a batch.</EmptyState>}
          <section aria-labelledby="stock-heading">
            <h2 id="stock-heading" className="mb-2 text-xl font-bold text-spruce-900">Passed stock builds</h2>
            {queue.data.finishedStock.length ? (
              <ul className="grid gap-2">{queue.data.finishedStock.map((u) => (
                <li key={u.id} className="flex flex-wrap items-center gap-3"><span className="font-mono">{u.serial}</span> {u.modelName} — {u.optionName}
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
