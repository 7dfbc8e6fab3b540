import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useLocation } from 'react-router';
import type { z } from 'zod';
import { shippingAddressSchema, type ShippingAddressInput } from '../../../shared/schemas/orders';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { ApiError } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { paths } from '../../lib/navigation';
import { usePlaceOrderAndPay, useQuote } from './api';
import { cart, MAX_PER_LINE, useCart, type CartLine } from './cart';
import type { SessionUser } from '../../../shared/roles';

// Countries we ship to; the code is what the order stores (ISO 3166-1 alpha-2).
const COUNTRIES: [string, string][] = [
  ['DE', 'Germany'], ['AT', 'Austria'], ['BE', 'Belgium'], ['CH', 'Switzerland'], ['DK', 'Denmark'], ['ES', 'Spain'], ['FR', 'France'],
  ['GB', 'United Kingdom'], ['IE', 'Ireland'], ['IT', 'Italy'], ['NL', 'Netherlands'], ['NO', 'Norway'], ['PL', 'Poland'], ['SE', 'Sweden'],
];

type AddressForm = z.input<typeof shippingAddressSchema>;

/** The cart and checkout; `viewer` is who is signed in (null: a visitor, undefined: still checking). */
export function CartPage({ viewer }: { viewer: SessionUser | null | undefined }) {
  const lines = useCart();
  const { money } = useFormatters();
  const location = useLocation();
  const quoteInput = useMemo(() => ({ lines: lines.map(({ modelId, optionId, quantity }) => ({ modelId, optionId, quantity })) }), [lines]);
  const quote = useQuote(quoteInput);
  const pay = usePlaceOrderAndPay();
  const form = useForm<AddressForm, unknown, ShippingAddressInput>({ resolver: zodResolver(shippingAddressSchema), defaultValues: { country: 'DE', line2: '', phone: '' } });
  const errors = form.formState.errors;

  const columns = useMemo<ColumnDef<CartLine, unknown>[]>(() => [
    { header: 'Pedal and option', accessorKey: 'label' },
    {
      header: 'Quantity', id: 'quantity', enableSorting: false,
      cell: ({ row }) => (
        <span className="inline-flex items-center gap-2">
          <Button type="button" variant="secondary" aria-label={`One fewer ${row.original.label}`} disabled={row.original.quantity <= 1} onClick={() => cart.setQuantity(row.original.optionId, row.original.quantity - 1)}>−</Button>
          <span className="num w-8 text-center" aria-label="Quantity">{row.original.quantity}</span>
          <Button type="button" variant="secondary" aria-label={`One more ${row.original.label}`} disabled={row.original.quantity >= MAX_PER_LINE} onClick={() => cart.setQuantity(row.original.optionId, row.original.quantity + 1)}>+</Button>
        </span>
      ),
    },
    {
      header: 'Amount', id: 'amount', enableSorting: false,
      cell: ({ row }) => {
        const priced = quote.data?.lines.find((l) => l.optionId === row.original.optionId);
        return priced ? <span className="num">{money(priced.lineTotalCents)}</span> : <span className="text-ink-soft">…</span>;
      },
    },
    { header: '', id: 'remove', enableSorting: false, cell: ({ row }) => <Button type="button" variant="quiet" onClick={() => cart.remove(row.original.optionId)}>Remove</Button> },
  ], [quote.data, money]);

  const onSubmit = form.handleSubmit((shipping) =>
    pay.mutate({ lines: quoteInput.lines, shipping }, {
      onSuccess: (placed) => {
        cart.clear();
        window.location.assign(placed.paymentUrl);
      },
      onError: (error) => {
        if (error instanceof ApiError && error.fields) {
          for (const [key, message] of Object.entries(error.fields)) {
            if (key.startsWith('shipping.')) form.setError(key.slice('shipping.'.length) as keyof AddressForm, { message });
          }
        }
      },
    }),
  );

  return (
    <>
      <PageHeader title="Your cart" />
      {lines.length === 0 ? (
        <EmptyState title="Your cart is empty"><Link to={paths.shop} className="font-semibold text-copper-700 underline">Choose a pedal</Link></EmptyState>
      ) : (
        <div className="grid gap-8 lg:grid-cols-[3fr_2fr]">
          <div className="flex min-w-0 flex-col gap-4">
            <DataTable data={lines} columns={columns} caption="Pedals in your cart" />
            {quote.isPending ? <Loading label="Working out the total…" /> : null}
            {quote.isError ? <ErrorState error={quote.error} retry={() => quote.refetch()} /> : null}
            {quote.data ? (
              <dl className="ml-auto grid w-full max-w-sm grid-cols-2 gap-y-1 rounded-lg border border-spruce-700/20 bg-white p-4">
                <dt>Subtotal</dt><dd className="num text-right">{money(quote.data.subtotalCents)}</dd>
                <dt>Shipping</dt><dd className="num text-right">{money(quote.data.shippingCents)}</dd>
                <dt>{quote.data.pricesIncludeTax ? `Tax included (${quote.data.taxRateBasisPoints / 100} %)` : `Tax (${quote.data.taxRateBasisPoints / 100} %)`}</dt>
                <dd className="num text-right">{money(quote.data.taxCents)}</dd>
                <dt className="border-t border-spruce-700/30 pt-1 text-lg font-bold">Total</dt>
                <dd className="num border-t border-spruce-700/30 pt-1 text-right text-lg font-bold">{money(quote.data.totalCents)}</dd>
              </dl>
            ) : null}
          </div>
          {viewer === undefined ? <Loading /> : !viewer ? (
            <Notice>
              <Link to={paths.signIn} state={{ from: location.pathname }} className="underline">Sign in</Link> or{' '}
              <Link to={paths.register} className="underline">create an account</Link> to order. Your cart stays here.
            </Notice>
          ) : viewer.role !== 'customer' ? (
            <Notice>Orders are placed from a customer account.</Notice>
          ) : (
            <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3 rounded-lg border border-spruce-700/20 bg-white p-4" aria-labelledby="ship-heading">
              <h2 id="ship-heading" className="text-xl font-bold text-spruce-900">Ship to</h2>
              {pay.isError ? <Notice tone="alarm">{pay.error.message}</Notice> : null}
              <TextField label="Full name" autoComplete="name" error={errors.name?.message} {...form.register('name')} />
              <TextField label="Street and number" autoComplete="address-line1" error={errors.line1?.message} {...form.register('line1')} />
              <TextField label="Address line 2 (optional)" autoComplete="address-line2" error={errors.line2?.message} {...form.register('line2')} />
              <div className="grid grid-cols-[1fr_2fr] gap-3">
                <TextField label="Postcode" autoComplete="postal-code" error={errors.postcode?.message} {...form.register('postcode')} />
                <TextField label="Town or city" autoComplete="address-level2" error={errors.city?.message} {...form.register('city')} />
              </div>
              <label className="flex flex-col gap-1 font-semibold">
                Country
                <select className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3 font-normal" autoComplete="country" {...form.register('country')}>
                  {COUNTRIES.map(([code, name]) => <option key={code} value={code}>{name}</option>)}
                </select>
                {errors.country ? <span className="text-sm text-alarm-700">{errors.country.message}</span> : null}
              </label>
              <TextField label="Phone for the carrier (optional)" type="tel" autoComplete="tel" error={errors.phone?.message} {...form.register('phone')} />
              <Button type="submit" busy={pay.isPending} disabled={!quote.data}>Place order and pay{quote.data ? ` ${money(quote.data.totalCents)}` : ''}</Button>
              <p className="text-sm text-ink-soft">You pay on the payment provider’s secure page; we never see your card.</p>
            </form>
          )}
        </div>
      )}
    </>
  );
}
