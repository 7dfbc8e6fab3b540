import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { OutlierReason, TrayStats } from '../../../shared/production/trays';
import type { CreateTrayInput, TrayListQuery, TrayReadingsInput } from '../../../shared/schemas/trays';
import type { H2Summary, PlanMethod } from '../../../shared/matching/batch';
import { api } from '../../lib/api';

export interface TrayRow { id: number; code: string; deviceId: number; deviceName: string; kind: string; supplierLot: string; receivedOn: string; slots: number; free: number; meanVf: number | null }
export interface TraySlot { id: number; slot: number; label: string; vf: number; unit: { id: number; serial: string; side: string } | null; flags: OutlierReason[] }
export interface TrayDetail {
  tray: { id: number; code: string; deviceId: number; deviceName: string; kind: string; partNumber: string | null; supplierLot: string; receivedOn: string; testCurrentMa: number; notes: string };
  slots: TraySlot[];
  stats: TrayStats;
}
export interface ProposalSlot { optionDeviceId: number; side: 'positive' | 'negative'; slotId: number; label: string; vf: number; deviceName: string }
export interface MatchProposal {
  batchId: number;
  options: { optionId: number; optionName: string; optionCode: string; method: PlanMethod; units: number; matched: number; nominalH2Dbc: number; matchedH2: H2Summary | null; randomH2: H2Summary | null; note: string }[];
  units: { unitId: number; serial: string; optionCode: string; mismatchMv: number; h2Dbc: number; slots: ProposalSlot[] }[];
  unmatched: { unitId: number; serial: string; reason: string }[];
  leftovers: { slotId: number; label: string; vf: number; deviceName: string }[];
}

export const trayKeys = {
  all: ['trays'] as const,
  list: (params: TrayListParams) => [...trayKeys.all, 'list', params] as const,
  detail: (id: number) => [...trayKeys.all, 'detail', id] as const,
};
export type TrayListParams = Partial<TrayListQuery>;

export const traysQuery = (params: TrayListParams) => queryOptions({ queryKey: trayKeys.list(params), queryFn: () => api.get<Page<TrayRow>>(`/api/trays${listSearch(params)}`), placeholderData: keepPreviousData });
export const trayQuery = (id: number) => queryOptions({ queryKey: trayKeys.detail(id), queryFn: () => api.get<TrayDetail>(`/api/trays/${id}`) });
export const useTrays = (params: TrayListParams) => useQuery(traysQuery(params));
export const useTray = (id: number) => useQuery(trayQuery(id));

export function useCreateTray() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateTrayInput) => api.post<TrayDetail>('/api/trays', input),
    onSuccess: () => client.invalidateQueries({ queryKey: trayKeys.all }),
  });
}

/** Saving readings answers the whole tray: put it straight into the cache (fast entry, slot after slot). */
function useTrayWrite<I>(id: number, fn: (input: I) => Promise<TrayDetail & { imported?: number }>) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (tray) => {
      client.setQueryData(trayKeys.detail(id), tray);
      void client.invalidateQueries({ queryKey: [...trayKeys.all, 'list'] });
    },
  });
}
export const useSaveTrayReadings = (id: number) => useTrayWrite(id, (input: TrayReadingsInput) => api.put<TrayDetail>(`/api/trays/${id}/slots`, input));
export const useImportTrayCsv = (id: number) => useTrayWrite(id, (form: FormData) => api.post<TrayDetail & { imported: number }>(`/api/trays/${id}/import`, form));
