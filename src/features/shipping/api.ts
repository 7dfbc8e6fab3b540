import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ShipOrderInput } from '../../../shared/schemas/production';
import type { OrderState } from '../../../shared/order-states';
import { api } from '../../lib/api';

export interface ShippingOrder {
  id: number; number: string; state: OrderState; dueAt: string | null; customerName: string; destination: string; units: number; passed: number; ordered: number;
  shipment: { id: number; carrier: string; trackingNumber: string; shippedAt: string; packingSlipUrl: string } | null;
}
export interface ShippingQueue { fromStock: { orderLineId: number; orderNumber: string; quantity: number; description: string }[]; orders: ShippingOrder[]; finishedStock: { id: number; serial: string; state: string; modelName: string; optionName: string }[] }

const keys = { all: ['shipping'] as const, queue: () => ['shipping', 'queue'] as const };
export const shippingQuery = () => queryOptions({ queryKey: keys.queue(), queryFn: () => api.get<ShippingQueue>('/api/shipping') });
export const useShipping = () => useQuery(shippingQuery());

function useShippingMutation<I, O>(fn: (input: I) => Promise<O>) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => client.invalidateQueries({ queryKey: keys.all }) });
}
export const useShipOrder = () => useShippingMutation((input: ShipOrderInput) => api.post<{ id: number; packingSlipUrl: string }>('/api/shipments', input));
export const useMarkDelivered = () => useShippingMutation((shipmentId: number) => api.post(`/api/shipments/${shipmentId}/delivered`));
export const useFulfilFromStock = () => useShippingMutation((orderLineId: number) => api.post<{ orderState: string; serials: string[] }>(`/api/order-lines/${orderLineId}/from-stock`));
export const useToFinishedStock = () => useShippingMutation((unitId: number) => api.post(`/api/units/${unitId}/finished-stock`));
