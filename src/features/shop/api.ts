import { queryOptions, useMutation, useQuery } from '@tanstack/react-query';
import type { CircuitSpec } from '../../../shared/engine';
import type { PlaceOrderInput, Quote, QuoteInput } from '../../../shared/schemas/orders';

export type { Quote };
import { api } from '../../lib/api';

// The storefront reads the catalog's public API (GET /api/models, /api/models/:id) and asks the
// server for every amount it shows (POST /api/shop/quote).

export interface ShopOptionSummary {
  id: number;
  code: string;
  name: string;
  description: string;
  surchargeCents: number;
}

export interface ShopModelSummary {
  id: number;
  name: string;
  sku: string;
  description: string;
  basePriceCents: number;
  photoUrl: string | null;
  options: ShopOptionSummary[];
}

export interface ShopOption extends ShopOptionSummary {
  topology: 'shunt' | 'feedback' | 'none';
  engineInput: { circuit: CircuitSpec; contract: unknown } | null;
}

export interface ShopModel extends Omit<ShopModelSummary, 'options'> {
  activeRevision: { id: number; number: number; drive: { referenceDrive: number } } | null;
  options: ShopOption[];
}

export const shopKeys = {
  all: ['shop'] as const,
  models: () => [...shopKeys.all, 'models'] as const,
  model: (id: number) => [...shopKeys.all, 'model', id] as const,
  quote: (input: QuoteInput) => [...shopKeys.all, 'quote', input] as const,
};

export const shopModelsQuery = () =>
  queryOptions({ queryKey: shopKeys.models(), queryFn: () => api.get<{ models: ShopModelSummary[] }>('/api/models').then((b) => b.models) });

export const shopModelQuery = (id: number) =>
  queryOptions({ queryKey: shopKeys.model(id), queryFn: () => api.get<{ model: ShopModel }>(`/api/models/${id}`).then((b) => b.model) });

export const quoteQuery = (input: QuoteInput) =>
  queryOptions({ queryKey: shopKeys.quote(input), queryFn: () => api.post<Quote>('/api/shop/quote', input), enabled: input.lines.length > 0, retry: false });

export const useShopModels = () => useQuery(shopModelsQuery());
export const useShopModel = (id: number) => useQuery(shopModelQuery(id));
export const useQuote = (input: QuoteInput) => useQuery(quoteQuery(input));

interface PlacedOrder {
  order: { id: number; number: string };
}

/** Places the order (priced again on the server) and opens the payment page for it. */
export function usePlaceOrderAndPay() {
  return useMutation({
    mutationFn: async (input: PlaceOrderInput) => {
      const placed = await api.post<PlacedOrder>('/api/orders', input);
      const { url } = await api.post<{ url: string }>(`/api/orders/${placed.order.id}/checkout`);
      return { ...placed.order, paymentUrl: url };
    },
  });
}
