import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { shipOrderSchema, type ShipOrderInput } from '../../../shared/schemas/production';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { printUrls, useCarriers, useShipOrder, type ShippingOrder } from './api';

const printLink = 'inline-flex min-h-11 items-center font-semibold text-copper-700 underline';

/** The packing bench's prints for a ready order: slip and address label, before the box is sealed. */
export function PrintLinks({ orderId, number }: { orderId: number; number: string }) {
  return (
    <div className="flex flex-wrap gap-x-4">
      <a href={printUrls.packingSlip(orderId)} target="_blank" rel="noreferrer" className={printLink} aria-label={`Packing slip for ${number} (PDF)`}>Packing slip</a>
      <a href={printUrls.addressLabel(orderId, '4x6')} target="_blank" rel="noreferrer" className={printLink} aria-label={`Address label 4 × 6 in for ${number} (PDF)`}>Label 4×6 in</a>
      <a href={printUrls.addressLabel(orderId, 'a6')} target="_blank" rel="noreferrer" className={printLink} aria-label={`Address label A6 for ${number} (PDF)`}>Label A6</a>
    </div>
  );
}

/** Ships a ready order: a carrier from the settings, the tracking number, then a confirmation. */
export function ShipForm({ order }: { order: ShippingOrder }) {
  const ship = useShipOrder();
  const carriers = useCarriers();
  const toast = useToast();
  const dialog = useRef<HTMLDialogElement>(null);
  const [pending, setPending] = useState<ShipOrderInput | null>(null);
  const form = useForm<ShipOrderInput>({ resolver: zodResolver(shipOrderSchema) as never, defaultValues: { orderId: order.id, trackingNumber: '' } });
  const errors = form.formState.errors;
  // The question opens when a valid form is submitted, and closes when answered either way.
  useEffect(() => {
    if (pending && !dialog.current?.open) dialog.current?.showModal();
    if (!pending) dialog.current?.close();
  }, [pending]);
  const carrierName = (id: number | undefined) => carriers.data?.find((c) => c.id === Number(id))?.name ?? 'the carrier';

  // mutateAsync, not mutate's callbacks: a shipped order leaves the list (and this form unmounts)
  // when the lists refresh, and the confirmation must still be said.
  const confirm = () => {
    setPending(null);
    if (!pending) return;
    ship.mutateAsync(pending).then(
      () => toast(`Order ${order.number} shipped with ${carrierName(pending.carrierId)}; the customer is e-mailed the tracking link`),
      (e: Error) => { applyFieldErrors(e, form.setError); toast(e.message, 'alarm'); },
    );
  };

  return (
    <div className="flex flex-col gap-2">
      <PrintLinks orderId={order.id} number={order.number} />
      <form noValidate className="flex flex-wrap items-end gap-3" onSubmit={form.handleSubmit((input) => setPending(input))}>
        <input type="hidden" {...form.register('orderId')} />
        <label className="flex flex-col gap-1 font-semibold">
          {`Carrier for ${order.number}`}
          <select className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal" aria-invalid={errors.carrierId ? true : undefined}
            disabled={!carriers.data} {...form.register('carrierId')}>
            <option value="">{carriers.isPending ? 'Loading carriers…' : 'Choose…'}</option>
            {carriers.data?.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
          </select>
          {errors.carrierId ? <span className="text-sm font-semibold text-alarm-700">{errors.carrierId.message}</span> : null}
          {carriers.isError ? <span className="text-sm font-semibold text-alarm-700">The carriers could not be loaded: {carriers.error.message}</span> : null}
          {carriers.data?.length === 0 ? <span className="text-sm text-ink-soft">No carriers yet: the owner adds them in the settings.</span> : null}
        </label>
        <TextField label="Tracking number" error={errors.trackingNumber?.message} {...form.register('trackingNumber')} />
        <Button type="submit" busy={ship.isPending}>Ship order</Button>
      </form>
      <dialog ref={dialog} onClose={() => setPending(null)} aria-labelledby={`ship-q-${order.id}`} className="m-auto max-w-md rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
        <p id={`ship-q-${order.id}`} className="mb-4 text-lg text-ink">
          Ship order {order.number} with {carrierName(pending?.carrierId)}, tracking number <span className="font-mono">{pending?.trackingNumber}</span>?
          The units are marked shipped and the customer is e-mailed at once; this cannot be undone.
        </p>
        <div className="flex justify-end gap-2">
          <Button type="button" variant="secondary" onClick={() => setPending(null)}>Not yet</Button>
          <Button type="button" onClick={confirm}>Yes, ship it</Button>
        </div>
      </dialog>
    </div>
  );
}
