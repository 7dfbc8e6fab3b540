import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useParams, useSearchParams } from 'react-router';
import { ORDER_STATE_LABELS, orderEventLabel, sentenceCase } from '../../../shared/order-states';
import { orderNoteSchema, type OrderNoteInput } from '../../../shared/schemas/orders';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { DataTable } from '../../components/ui/DataTable';
import { Ident } from '../../components/ui/Ident';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { OrderSpecSheets } from '../../components/spec-sheets';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { paths } from '../../lib/navigation';
import { useAddNote, useCancelOrder, useMarkDelivered, useOrder, useStartPayment, type OrderEvent, type OrderLine, type PaymentReturn } from './api';
import { CANCELLABLE, OrderProgress } from './OrderProgress';

export default function OrderPage() {
  const id = Number(useParams().orderId);
  const [search] = useSearchParams();
  const back: PaymentReturn = search.has('paid') ? 'paid' : search.get('payment') === 'cancelled' ? 'left' : null;
  const [since] = useState(() => Date.now());
  const detail = useOrder(id, back, since);
  const { money, dateTime } = useFormatters();
  const toast = useToast();
  const cancel = useCancelOrder();
  const pay = useStartPayment();
  const delivered = useMarkDelivered();

  if (detail.isPending) return <Loading label="Loading the order…" />;
  if (detail.isError) return <ErrorState error={detail.error} retry={() => detail.refetch()} />;
  const { order, lines, shipments, events } = detail.data;
  const staff = order.customer !== undefined;
  const awaiting = order.state === 'awaiting_payment';

  const lineColumns: ColumnDef<OrderLine, unknown>[] = [
    { header: 'Pedal and clipping option', accessorKey: 'description' },
    { header: 'Quantity', accessorKey: 'quantity', cell: ({ getValue }) => <span className="num">{getValue() as number}</span> },
    { header: 'Each', accessorKey: 'unit_price_cents', cell: ({ getValue }) => <span className="num">{money(getValue() as number)}</span> },
    { header: 'Amount', accessorKey: 'line_total_cents', cell: ({ getValue }) => <span className="num">{money(getValue() as number)}</span> },
  ];
  const eventColumns: ColumnDef<OrderEvent, unknown>[] = [
    { header: 'When', accessorKey: 'created_at', cell: ({ getValue }) => <span className="whitespace-nowrap">{dateTime(getValue() as string)}</span> },
    { header: 'What', id: 'what', cell: ({ row }) => orderEventLabel(row.original) },
    { header: 'Details', accessorKey: 'message', cell: ({ getValue }) => sentenceCase((getValue() as string | null) ?? '') },
    { header: 'By', accessorKey: 'user_name', cell: ({ getValue }) => (getValue() as string | null) ?? '—' },
  ];

  const onCancel = () =>
    cancel.mutate({ id }, {
      onSuccess: (d) => toast(d.order.state === 'refunded' ? `Order ${order.number} is cancelled and ${money(order.totalCents)} refunded` : `Order ${order.number} is cancelled`),
      onError: (e) => toast(e.message, 'alarm'),
    });

  return (
    <>
      <PageHeader title={<>Order <Ident>{order.number}</Ident></>}>
        <Link to={staff ? paths.orderDesk : paths.myOrders} className="inline-flex min-h-11 items-center font-semibold text-copper-700 underline">{staff ? 'All orders' : 'My orders'}</Link>
      </PageHeader>
      <div className="flex flex-col gap-6">
        {order.state === 'paid' && back === 'paid' ? <Notice tone="good">Payment received — thank you. Your receipt is on its way by e-mail.</Notice> : null}
        {awaiting && back === 'paid' ? <Notice>Confirming your payment with the provider…</Notice> : null}
        {awaiting && order.lastPaymentError && back !== 'paid' ? (
          <Notice tone="alarm">Your payment did not go through: {order.lastPaymentError} Nothing was charged; your order is kept and still awaits payment.</Notice>
        ) : null}
        {awaiting && !order.lastPaymentError && back === 'left' ? <Notice>You left the payment page before paying. Your order is kept and awaits payment.</Notice> : null}

        <section aria-label="Status" className="rounded-lg border border-spruce-700/20 bg-white p-4">
          <p className="mb-2 text-lg">Status: <strong data-testid="order-state">{ORDER_STATE_LABELS[order.state]}</strong></p>
          <OrderProgress state={order.state} />
          <p className="mt-2 text-sm text-ink-soft">Placed {dateTime(order.createdAt)}{order.paidAt ? ` · paid ${dateTime(order.paidAt)}` : ''}</p>
          {shipments.map((s) => (
            <p key={s.id} className="mt-2">
              {s.deliveredAt ? `Delivered ${dateTime(s.deliveredAt)}` : `Shipped ${dateTime(s.shippedAt)}`} with {s.carrier}, tracking number <span className="font-mono">{s.trackingNumber}</span>
              {s.trackingUrl ? <> · <a href={s.trackingUrl} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center font-semibold text-copper-700 underline">Track the parcel with {s.carrier}</a></> : null}
            </p>
          ))}
          <div className="mt-3 flex flex-wrap gap-2">
            {awaiting && !staff ? (
              <Button type="button" busy={pay.isPending} onClick={() => pay.mutate(id, { onSuccess: ({ url }) => window.location.assign(url), onError: (e) => toast(e.message, 'alarm') })}>
                {order.lastPaymentError ? 'Try paying again' : `Pay ${money(order.totalCents)}`}
              </Button>
            ) : null}
            {CANCELLABLE.includes(order.state) ? (
              <ConfirmButton label={awaiting ? 'Cancel order' : 'Cancel and refund'} busy={cancel.isPending} onConfirm={onCancel}
                question={awaiting ? `Cancel order ${order.number}? Nothing has been charged.` : `Cancel order ${order.number} and refund ${money(order.totalCents)} to the card it was paid with?`}
                confirmLabel={awaiting ? 'Cancel order' : 'Cancel and refund'} />
            ) : null}
            {staff && order.state === 'shipped' ? (
              <Button type="button" variant="secondary" busy={delivered.isPending} onClick={() => delivered.mutate({ id }, { onSuccess: () => toast(`Order ${order.number} marked delivered`), onError: (e) => toast(e.message, 'alarm') })}>
                Mark delivered
              </Button>
            ) : null}
          </div>
        </section>

        <section aria-labelledby="receipt-heading">
          <h2 id="receipt-heading" className="mb-2 text-xl font-bold text-spruce-900">Receipt</h2>
          <DataTable data={lines} columns={lineColumns} caption={`Lines of order ${order.number}`} />
          <dl className="mt-3 ml-auto grid max-w-sm grid-cols-2 gap-y-1 rounded-lg border border-spruce-700/20 bg-white p-4">
            <dt>Subtotal</dt><dd className="num text-right">{money(order.subtotalCents)}</dd>
            <dt>Shipping</dt><dd className="num text-right">{money(order.shippingCents)}</dd>
            <dt>{order.totalCents === order.subtotalCents + order.shippingCents ? 'Tax included' : 'Tax'}</dt><dd className="num text-right">{money(order.taxCents)}</dd>
            <dt className="font-bold">Total</dt><dd className="num text-right font-bold">{money(order.totalCents)}</dd>
          </dl>
        </section>

        {/* Unit progress: production fills in each unit's build and test progress for these lines here. */}
        <section aria-labelledby="units-heading" className="rounded-lg border border-dashed border-spruce-700/40 bg-white/60 p-4">
          {staff ? (
            <>
              <h2 id="units-heading" className="text-xl font-bold text-spruce-900">Units for this order</h2>
              <p className="text-ink-soft">Each unit’s serial and its spec sheet, once the order is in a released batch.</p>
            </>
          ) : (
            <>
              <h2 id="units-heading" className="text-xl font-bold text-spruce-900">Your pedals on the bench</h2>
              <p className="text-ink-soft">Once the order is scheduled into a build batch, each pedal’s serial number and its build and test progress appear here.</p>
            </>
          )}
          <OrderSpecSheets orderId={id} />
        </section>

        <section aria-labelledby="ship-heading" className="rounded-lg border border-spruce-700/20 bg-white p-4">
          <h2 id="ship-heading" className="text-xl font-bold text-spruce-900">Ship to</h2>
          <address className="not-italic">
            {order.shipping.name}<br />{order.shipping.line1}<br />{order.shipping.line2 ? <>{order.shipping.line2}<br /></> : null}
            {order.shipping.postcode} {order.shipping.city}<br />{order.shipping.country}{order.shipping.phone ? <><br />{order.shipping.phone}</> : null}
          </address>
          {staff && order.customer ? <p className="mt-2 text-ink-soft">Customer: {order.customer.name} · {order.customer.email}</p> : null}
        </section>

        {staff ? <StaffNotes id={id} notes={order.staffNotes ?? ''} /> : null}

        <section aria-labelledby="history-heading">
          <h2 id="history-heading" className="mb-2 text-xl font-bold text-spruce-900">History</h2>
          <DataTable data={events} columns={eventColumns} caption={`History of order ${order.number}`} />
        </section>
      </div>
    </>
  );
}

function StaffNotes({ id, notes }: { id: number; notes: string }) {
  const add = useAddNote();
  const toast = useToast();
  const form = useForm<OrderNoteInput>({ resolver: zodResolver(orderNoteSchema) });
  const onSubmit = form.handleSubmit((input) =>
    add.mutate({ id, note: input.note }, {
      onSuccess: () => { form.reset({ note: '' }); toast('Note added to the order'); },
      onError: (e) => applyFieldErrors(e, form.setError),
    }),
  );
  return (
    <section aria-labelledby="notes-heading" className="rounded-lg border border-spruce-700/20 bg-white p-4">
      <h2 id="notes-heading" className="text-xl font-bold text-spruce-900">Staff notes</h2>
      <p className="mb-2 text-sm text-ink-soft">Only staff see these.</p>
      {notes ? <pre className="mb-3 font-sans whitespace-pre-wrap">{notes}</pre> : <p className="mb-3 text-ink-soft">No notes yet.</p>}
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-2">
        <label htmlFor="order-note" className="font-semibold">New note</label>
        <textarea id="order-note" rows={3} className="rounded-md border border-spruce-700/40 p-2" aria-invalid={form.formState.errors.note ? true : undefined} {...form.register('note')} />
        {form.formState.errors.note ? <p className="text-sm font-semibold text-alarm-700">{form.formState.errors.note.message}</p> : null}
        <Button type="submit" variant="secondary" busy={add.isPending} className="self-start">Add note</Button>
      </form>
    </section>
  );
}
