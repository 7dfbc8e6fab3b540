import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { ShipmentListQuery, ShippingListQuery, ShipOrderInput } from '../../../shared/schemas/production';
import type { OrderState } from '../../../shared/order-states';
import { api } from '../../lib/api';

export interface ShippingOrder {
  id: number; number: string; state: OrderState; dueAt: string | null; customerName: string; destination: string; units: number; passed: number; ordered: number;
}
export interface Shipment {
  id: number; orderId: number; orderNumber: string; orderState: OrderState; customerName: string; destination: string;
  carrier: string; trackingNumber: string; shippedAt: string; deliveredAt: string | null; packingSlipUrl: string | null;
}
export interface ShippingQueue {
  orders: Page<ShippingOrder>;
  fromStock: { orderLineId: number; orderNumber: string; quantity: number; description: string }[];
  finishedStock: { id: number; serial: string; state: string; modelName: string; optionName: string }[];
}
export type ShippingParams = Partial<ShippingListQuery>;
export type ShipmentParams = Partial<ShipmentListQuery>;

const keys = {
  all: ['shipping'] as const,
  queues: () => [...keys.all, 'queue'] as const,
  queue: (params: ShippingParams) => [...keys.queues(), params] as const,
  shipments: () => [...keys.all, 'shipments'] as const,
  shipmentPage: (params: ShipmentParams) => [...keys.shipments(), params] as const,
};
export const shippingQuery = (params: ShippingParams) =>
  queryOptions({ queryKey: keys.queue(params), queryFn: () => api.get<ShippingQueue>(`/api/shipping${listSearch(params)}`), placeholderData: keepPreviousData });
export const shipmentsQuery = (params: ShipmentParams) =>
  queryOptions({ queryKey: keys.shipmentPage(params), queryFn: () => api.get<Page<Shipment>>(`/api/shipments${listSearch(params)}`), placeholderData: keepPreviousData });
export const useShipping = (params: ShippingParams) => useQuery(shippingQuery(params));
export const useShipments = (params: ShipmentParams) => useQuery(shipmentsQuery(params));

function useShippingMutation<I, O>(fn: (input: I) => Promise<O>) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => client.invalidateQueries({ queryKey: keys.all }) });
}
export const useShipOrder = () => useShippingMutation((input: ShipOrderInput) => api.post<{ id: number; packingSlipUrl: string }>('/api/shipments', input));
export const useMarkDelivered = () => useShippingMutation((shipmentId: number) => api.post(`/api/shipments/${shipmentId}/delivered`));
export const useFulfilFromStock = () => useShippingMutation((orderLineId: number) => api.post<{ orderState: string; serials: string[] }>(`/api/order-lines/${orderLineId}/from-stock`));
export const useToFinishedStock = () => useShippingMutation((unitId: number) => api.post(`/api/units/${unitId}/finished-stock`));
