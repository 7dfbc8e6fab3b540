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
  carrier: string; trackingNumber: string; trackingUrl: string | null; shippedAt: string; deliveredAt: string | null; packingSlipUrl: string | null;
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

/** A carrier from the shop's settings that shipping can choose. */
export interface ShippingCarrier { id: number; name: string; trackingUrlTemplate: string; active: boolean }
export const carriersQuery = () =>
  queryOptions({ queryKey: [...keys.all, 'carriers'] as const, queryFn: () => api.get<{ carriers: ShippingCarrier[] }>('/api/carriers').then((b) => b.carriers), staleTime: 60_000 });
export const useCarriers = () => useQuery(carriersQuery());

/** Where the packing bench's PDFs are (they open in the browser's viewer, to print from there). */
export const printUrls = {
  packingSlip: (orderId: number) => `/api/orders/${orderId}/packing-slip.pdf`,
  addressLabel: (orderId: number, size: '4x6' | 'a6') => `/api/orders/${orderId}/address-label.pdf?size=${size}`,
  serialLabels: (batchId: number) => `/api/batches/${batchId}/serial-labels.pdf`,
};
export const useShipments = (params: ShipmentParams) => useQuery(shipmentsQuery(params));

function useShippingMutation<I, O>(fn: (input: I) => Promise<O>) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => client.invalidateQueries({ queryKey: keys.all }) });
}
export const useShipOrder = () => useShippingMutation((input: ShipOrderInput) => api.post<{ id: number; packingSlipUrl: string }>('/api/shipments', input));
export const useMarkDelivered = () => useShippingMutation((shipmentId: number) => api.post(`/api/shipments/${shipmentId}/delivered`));
export const useFulfilFromStock = () => useShippingMutation((orderLineId: number) => api.post<{ orderState: string; serials: string[] }>(`/api/order-lines/${orderLineId}/from-stock`));
export const useToFinishedStock = () => useShippingMutation((unitId: number) => api.post(`/api/units/${unitId}/finished-stock`));
