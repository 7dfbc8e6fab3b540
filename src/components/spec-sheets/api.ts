// Spec sheet data for any page: a batch's sheet job (latest, polled while it runs) and starting one.
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SheetJobView } from '../../../shared/schemas/spec-sheets';
import { api } from '../../lib/api';

/** The job as the API reports it; the type lives in shared/ with the server's. */
export type SheetJob = SheetJobView;

export const sheetPdfUrl = (serial: string) => `/api/units/${encodeURIComponent(serial)}/spec-sheet.pdf`;
export const archiveUrl = (jobId: number) => `/api/spec-sheet-jobs/${jobId}/archive.zip`;

export const specSheetKeys = {
  all: ['spec-sheets'] as const,
  batchJob: (batchId: number) => [...specSheetKeys.all, 'batch-job', batchId] as const,
};

const working = (job: SheetJob | null | undefined) => job?.state === 'queued' || job?.state === 'running';

/** The batch's latest job, read from the server, so a reload finds the same progress; polls while it works. */
export const batchJobQuery = (batchId: number) =>
  queryOptions({
    queryKey: specSheetKeys.batchJob(batchId),
    queryFn: () => api.get<{ job: SheetJob | null }>(`/api/batches/${batchId}/spec-sheets/latest`).then((b) => b.job),
    refetchInterval: (query) => (working(query.state.data) ? 700 : false),
  });

export const useBatchJob = (batchId: number) => useQuery(batchJobQuery(batchId));

export function useStartBatchSheets(batchId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ job: SheetJob }>(`/api/batches/${batchId}/spec-sheets`).then((b) => b.job),
    onSuccess: (job) => client.setQueryData(batchJobQuery(batchId).queryKey, job),
  });
}

export function useRegenerateSheet(serial: string) {
  return useMutation({
    mutationFn: () => api.post<{ serial: string; version: number }>(`/api/units/${encodeURIComponent(serial)}/spec-sheet/regenerate`),
  });
}

export interface OrderUnitSheet {
  serial: string;
  state: string;
  modelName: string;
  optionName: string;
  sheetReady: boolean;
}

export const orderSheetsQuery = (orderId: number) =>
  queryOptions({
    queryKey: [...specSheetKeys.all, 'order', orderId] as const,
    queryFn: () => api.get<{ units: OrderUnitSheet[] }>(`/api/orders/${orderId}/spec-sheets`).then((b) => b.units),
  });

export const useOrderSheets = (orderId: number) => useQuery(orderSheetsQuery(orderId));
