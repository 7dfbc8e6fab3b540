import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { OrderState } from '../../../shared/order-states';
import type { MyOrdersQuery, OrderFilter } from '../../../shared/schemas/orders';
import { listSearch, type Page } from '../../../shared/schemas/list';

/** What the order desk asks for: filters, sort and page (the server's defaults fill the rest). */
export type OrderListParams = Partial<OrderFilter>;
import { api } from '../../lib/api';

export interface OrderLine {
  id: number;
  order_id: number;
  model_id: number;
  option_id: number;
  option_code: string;
  quantity: number;
  unit_price_cents: number;
  line_total_cents: number;
  description: string;
  batch_id: number | null;
}

export interface Order {
  id: number;
  number: string;
  state: OrderState;
  currency: string;
  subtotalCents: number;
  shippingCents: number;
  taxCents: number;
  totalCents: number;
  shipping: { name: string; line1: string; line2: string; city: string; postcode: string; country: string; phone: string };
  lastPaymentError: string | null;
  paidAt: string | null;
  dueAt: string | null;
  createdAt: string;
  updatedAt: string;
  staffNotes?: string;
  customer?: { id: number; name: string; email: string };
}

export interface OrderEvent {
  id: number;
  kind: string;
  from_state: OrderState | null;
  to_state: OrderState | null;
  message: string;
  created_at: string;
  user_name: string | null;
}

/** A parcel of the order: its carrier and tracking number, and the carrier's tracking link ('' when none was made). */
export interface OrderShipment {
  id: number; carrier: string; trackingNumber: string; trackingUrl: string; shippedAt: string; deliveredAt: string | null;
}

export interface OrderDetail {
  order: Order;
  lines: OrderLine[];
  shipments: OrderShipment[];
  events: OrderEvent[];
}

export interface OrderListRow {
  id: number;
  number: string;
  state: OrderState;
  currency: string;
  total_cents: number;
  created_at: string;
  paid_at: string | null;
  customer_name: string;
  customer_email: string;
  units: number;
  summary: string;
}

export const orderKeys = {
  all: ['orders'] as const,
  mine: (params: MyOrderParams) => [...orderKeys.all, 'mine', params] as const,
  lists: () => [...orderKeys.all, 'list'] as const,
  list: (filter: OrderListParams) => [...orderKeys.lists(), filter] as const,
  detail: (id: number) => [...orderKeys.all, 'detail', id] as const,
};


/** What the customer's own list asks for (the server's defaults fill the rest). */
export type MyOrderParams = Partial<MyOrdersQuery>;
/** One page of the customer's own orders, newest first, each with its lines. */
export const myOrdersQuery = (params: MyOrderParams) =>
  queryOptions({ queryKey: orderKeys.mine(params), queryFn: () => api.get<Page<Order & { lines: OrderLine[] }>>(`/api/orders/mine${listSearch(params)}`), placeholderData: keepPreviousData });
/** One page of the order desk, as the server filters, sorts and pages it. */
export const ordersQuery = (filter: OrderListParams) =>
  queryOptions({ queryKey: orderKeys.list(filter), queryFn: () => api.get<Page<OrderListRow>>(`/api/orders${listSearch(filter)}`), placeholderData: keepPreviousData });
/** How the customer came back from the payment page: paid there, left it, or neither. */
export type PaymentReturn = 'paid' | 'left' | null;

// Back from the payment page, the provider's confirmation may land a moment after the customer:
// look again every 1.5 s until the order shows what happened (for at most a minute).
function pollWhileConfirming(back: PaymentReturn, since: number) {
  return (q: { state: { data?: OrderDetail } }) => {
    const o = q.state.data?.order;
    if (!back || !o || o.state !== 'awaiting_payment' || Date.now() - since > 60_000) return false;
    if (back === 'left' && o.lastPaymentError) return false;
    return 1_500;
  };
}

export const orderQuery = (id: number, back: PaymentReturn = null, since = Date.now()) =>
  queryOptions({ queryKey: orderKeys.detail(id), queryFn: () => api.get<OrderDetail>(`/api/orders/${id}`), refetchInterval: pollWhileConfirming(back, since) });

export const useMyOrders = (params: MyOrderParams) => useQuery(myOrdersQuery(params));
export const useOrders = (filter: OrderListParams) => useQuery(ordersQuery(filter));
export const useOrder = (id: number, back: PaymentReturn = null, since?: number) => useQuery(orderQuery(id, back, since));

function useOrderMutation<I>(fn: (input: I) => Promise<OrderDetail>) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (detail) => {
      client.setQueryData(orderKeys.detail(detail.order.id), detail);
      void client.invalidateQueries({ queryKey: orderKeys.all });
    },
  });
}

export const useCancelOrder = () => useOrderMutation(({ id, reason }: { id: number; reason?: string }) => api.post<OrderDetail>(`/api/orders/${id}/cancel`, { reason }));
export const useAddNote = () => useOrderMutation(({ id, note }: { id: number; note: string }) => api.post<OrderDetail>(`/api/orders/${id}/notes`, { note }));
export const useMarkDelivered = () => useOrderMutation(({ id }: { id: number }) => api.post<OrderDetail>(`/api/orders/${id}/delivered`, {}));

export function useStartPayment() {
  return useMutation({ mutationFn: (id: number) => api.post<{ url: string }>(`/api/orders/${id}/checkout`) });
}

/** Clipping options to filter by, from the catalog's model list. */
export const optionChoicesQuery = () =>
  queryOptions({
    queryKey: [...orderKeys.all, 'option-choices'] as const,
    queryFn: () =>
      api.get<{ models: { name: string; options: { id: number; name: string }[] }[] }>('/api/models')
        .then((b) => b.models.flatMap((m) => m.options.map((o) => ({ id: o.id, label: `${m.name} — ${o.name}` })))),
    staleTime: 5 * 60_000,
  });
export const useOptionChoices = () => useQuery(optionChoicesQuery());
