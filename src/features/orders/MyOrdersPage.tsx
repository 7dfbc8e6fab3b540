import { useState } from 'react';
import { Link } from 'react-router';
import { Pager } from '../../components/ui/DataTable';
import { Ident } from '../../components/ui/Ident';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { orderPath, paths } from '../../lib/navigation';
import { useMyOrders } from './api';
import { OrderProgress } from './OrderProgress';

export default function MyOrdersPage() {
  // Newest first, ten to a page: a regular customer's five years of orders stay quick to open.
  const [page, setPage] = useState(1);
  const orders = useMyOrders({ page });
  const { money, date } = useFormatters();
  return (
    <>
      <PageHeader title="My orders" />
      {orders.isPending ? <Loading label="Loading your orders…" /> : null}
      {orders.isError ? <ErrorState error={orders.error} retry={() => orders.refetch()} /> : null}
      {orders.data?.total === 0 ? (
        <EmptyState title="No orders yet"><Link to={paths.shop} className="font-semibold text-copper-700 underline">Choose a pedal</Link></EmptyState>
      ) : null}
      <ul className="flex flex-col gap-4">
        {orders.data?.items.map((o) => (
          <li key={o.id} className="rounded-lg border border-spruce-700/20 bg-white p-4">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h2 className="text-xl font-bold text-spruce-900">Order <Ident>{o.number}</Ident></h2>
              <span className="text-ink-soft">placed {date(o.createdAt)} · <span className="num font-semibold text-ink">{money(o.totalCents)}</span></span>
            </div>
            <div className="my-3"><OrderProgress state={o.state} /></div>
            <ul className="mb-3 list-inside list-disc text-ink">
              {o.lines.map((l) => <li key={l.id}>{l.quantity} × {l.description}</li>)}
            </ul>
            {o.lastPaymentError && o.state === 'awaiting_payment' ? <p className="mb-2 font-semibold text-alarm-700">Payment did not go through: {o.lastPaymentError}</p> : null}
            <Link to={orderPath(o.id)} className="inline-flex min-h-11 items-center font-semibold text-copper-700 underline">Details and receipt for&nbsp;<Ident>{o.number}</Ident></Link>
          </li>
        ))}
      </ul>
      {orders.data && orders.data.total > orders.data.pageSize ? (
        <div className="mt-4">
          <Pager label="Your orders" listing={{ sort: 'createdAt', dir: 'desc', onSort: () => undefined, page: orders.data, onPage: setPage, noun: ['order', 'orders'] }} />
        </div>
      ) : null}
    </>
  );
}
