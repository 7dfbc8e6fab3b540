import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AddBatchLinesInput, ApplyAssignmentsInput, AssemblerProfileInput, BatchListQuery, CandidateLinesQuery, CreateBatchInput, ReleaseBatchInput } from '../../../shared/schemas/production';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { BatchState, UnitState } from '../../../shared/production/states';
import type { DayLoad, PlanAssembler, PlanJob, PlannedBuild } from '../../../shared/production/schedule';
import type { AcceptMatchInput, MatchProposalInput } from '../../../shared/schemas/trays';
import { api } from '../../lib/api';
import { trayKeys, type MatchProposal } from '../trays/api';

export interface BatchRow { id: number; number: number; label: string; state: BatchState; modelName: string; revisionNumber: number; units: number; releasedAt: string | null; createdAt: string }
export interface Requirement {
  partId: number; partNumber: string; description: string; supplier: string | null; leadTimeDays: number;
  baseQuantity: number; optionQuantity: number; required: number; available: number; reservedForBatch: number; consumedForBatch: number; shortage: number;
}
export interface BatchUnit { id: number; serial: string; sequence: number; state: UnitState; assemblerId: number | null; assemblerName: string | null; plannedDate: string | null; kitted: boolean; optionCode: string; orderNumber: string | null; dueAt: string | null; slots: string[] }
export interface BatchDetail {
  batch: { id: number; label: string; state: BatchState; modelId: number; modelName: string; revisionNumber: number; revisionLabel: string; notes: string; shortageOverrideReason: string | null; releasedAt: string | null; plannedStart: string | null };
  lines: { id: number; quantity: number; optionId: number; optionCode: string; optionName: string; orderNumber: string | null; dueAt: string | null; customerName: string | null }[];
  /** Whom releasing mails a ship date (while the batch is being planned). */
  customersToMail: { orderNumber: string; name: string; email: string }[];
  units: BatchUnit[];
  requirements: Requirement[];
  earliestStart: { date: string; waitingOn: string | null };
  /** Units made by the release so far (a big release makes them in a background job). */
  release: { total: number; done: number; error: string | null } | null;
}
export interface Candidates {
  revisions: { id: number; modelId: number; modelName: string; number: number; label: string; active: boolean; frozen: boolean; options: { id: number; code: string; name: string }[] }[];
  /** One page of the paid order lines waiting for a batch (for one model when asked). */
  orderLines: Page<{ id: number; modelId: number; optionId: number; quantity: number; description: string; orderNumber: string; dueAt: string | null; customerName: string }>;
}
export interface PlanProposal { startDate: string; jobs: PlanJob[]; assemblers: PlanAssembler[]; builds: PlannedBuild[]; unassignable: number[]; load: DayLoad[]; late: number[] }

const keys = {
  all: ['batches'] as const,
  lists: () => [...keys.all, 'list'] as const,
  list: (params: BatchListParams) => [...keys.lists(), params] as const,
  detail: (id: number) => [...keys.all, 'detail', id] as const,
  candidates: (params: CandidateParams) => [...keys.all, 'candidates', params] as const,
};

export type BatchListParams = Partial<BatchListQuery>;
/** One page of batches, as the server sorts and filters them. */
export const batchesQuery = (params: BatchListParams) => queryOptions({ queryKey: keys.list(params), queryFn: () => api.get<Page<BatchRow>>(`/api/batches${listSearch(params)}`), placeholderData: keepPreviousData });
export const batchQuery = (id: number) => queryOptions({
  queryKey: keys.detail(id), queryFn: () => api.get<BatchDetail>(`/api/batches/${id}`),
  // While the release job makes the units, follow its progress.
  refetchInterval: (query) => (query.state.data?.batch.state === 'releasing' ? 1000 : false),
});
export type CandidateParams = Partial<CandidateLinesQuery>;
/** Revisions with their options, and one page of waiting order lines (filtered by model, sorted by due date). */
export const candidatesQuery = (params: CandidateParams) =>
  queryOptions({ queryKey: keys.candidates(params), queryFn: () => api.get<Candidates>(`/api/batches/candidates${listSearch(params)}`), placeholderData: keepPreviousData });
export const assemblersQuery = () => queryOptions({ queryKey: ['assemblers', 'list'], queryFn: () => api.get<{ assemblers: PlanAssembler[] }>('/api/assemblers').then((b) => b.assemblers) });

export const useBatches = (params: BatchListParams) => useQuery(batchesQuery(params));
export const useBatch = (id: number) => useQuery(batchQuery(id));
export const useCandidates = (params: CandidateParams) => useQuery(candidatesQuery(params));
export const useAssemblers = () => useQuery(assemblersQuery());

/** Every batch change refreshes the whole batches tree (list, detail, candidates). */
function useBatchMutation<I, O>(fn: (input: I) => Promise<O>) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => client.invalidateQueries({ queryKey: keys.all }) });
}

export const useCreateBatch = () => useBatchMutation((input: CreateBatchInput) => api.post<{ id: number; number: number }>('/api/batches', input));
export const useReleaseBatch = (id: number) => useBatchMutation((input: ReleaseBatchInput) => api.post<{ state: 'released' | 'releasing'; units: number; done: number; orders: number }>(`/api/batches/${id}/release`, input));
export const useAddBatchLines = (id: number) => useBatchMutation((input: AddBatchLinesInput) => api.post<{ added: number; units: number }>(`/api/batches/${id}/lines`, input));
export const useRemoveBatchLine = (id: number) => useBatchMutation((lineId: number) => api.delete<{ units: number }>(`/api/batches/${id}/lines/${lineId}`));
export const useCancelBatch = (id: number) => useBatchMutation((reason: string) => api.post(`/api/batches/${id}/cancel`, { reason }));
export const useReserveStock = (id: number) => useBatchMutation(() => api.post<{ reserved: number; stillShort: number }>(`/api/batches/${id}/reserve`));
export const useKitBatch = (id: number) => useBatchMutation(() => api.post<{ kitted: number; notKitted: number; firstProblem: string | null }>(`/api/batches/${id}/kit`));
export const useProposePlan = (id: number) => useMutation({ mutationFn: (startDate?: string) => api.post<PlanProposal>(`/api/batches/${id}/plan-proposal`, startDate ? { startDate } : {}) });
export function useUpdateAssembler() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: AssemblerProfileInput & { id: number }) => api.put<{ assembler: PlanAssembler }>(`/api/assemblers/${id}`, input),
    onSuccess: () => client.invalidateQueries({ queryKey: assemblersQuery().queryKey }),
  });
}
export const useCancelUnit = () => useBatchMutation(({ unitId, reason }: { unitId: number; reason: string }) => api.post(`/api/units/${unitId}/cancel`, { reason }));
export const useApplyAssignments = (id: number) => useBatchMutation((input: ApplyAssignmentsInput) => api.post<{ assigned: number; late: number[] }>(`/api/batches/${id}/assignments`, input));

/** Which tray slots go into which unit: a proposal (nothing written), then accepting it. */
export const useProposeMatching = (id: number) => useMutation({ mutationFn: (input: Partial<MatchProposalInput>) => api.post<MatchProposal>(`/api/batches/${id}/matching/proposal`, input) });
export function useAcceptMatching(id: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: AcceptMatchInput) => api.post<{ batchId: number; matched: number }>(`/api/batches/${id}/matching`, input),
    onSuccess: () => Promise.all([client.invalidateQueries({ queryKey: keys.all }), client.invalidateQueries({ queryKey: trayKeys.all })]),
  });
}
