import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { shipOrderSchema, type ShipOrderInput } from '../../../shared/schemas/production';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useShipOrder, type ShippingOrder } from './api';

export function ShipForm({ order }: { order: ShippingOrder }) {
  const ship = useShipOrder();
  const toast = useToast();
  const form = useForm<ShipOrderInput>({ resolver: zodResolver(shipOrderSchema) as never, defaultValues: { orderId: order.id, carrier: '', trackingNumber: '' } });
  const errors = form.formState.errors;
  return (
    // mutateAsync, not mutate's callbacks: a shipped order leaves the list (and this form unmounts)
    // when the lists refresh, and the confirmation must still be said.
    <form noValidate className="flex flex-wrap items-end gap-3" onSubmit={form.handleSubmit((input) => ship.mutateAsync(input).then(
      () => toast(`Order ${order.number} shipped; the customer is e-mailed the tracking number`),
      (e: Error) => { applyFieldErrors(e, form.setError); toast(e.message, 'alarm'); },
    ))}>
      <input type="hidden" {...form.register('orderId')} />
      <TextField label={`Carrier for ${order.number}`} error={errors.carrier?.message} {...form.register('carrier')} />
      <TextField label="Tracking number" error={errors.trackingNumber?.message} {...form.register('trackingNumber')} />
      <Button type="submit" busy={ship.isPending}>Ship order</Button>
    </form>
  );
}
