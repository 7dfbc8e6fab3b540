import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { BuildListQuery, DeviceReadingsInput, PartLotsInput } from '../../../shared/schemas/production';
import type { UnitState } from '../../../shared/production/states';
import { api } from '../../lib/api';

export interface BuildRow { queueRank: number; id: number; serial: string; state: UnitState; plannedDate: string | null; kitted: boolean; modelName: string; optionName: string; steps: number; stepsDone: number; late: string | null }
export interface UnitDetail {
  unit: { id: number; serial: string; state: UnitState; kitted: boolean; plannedDate: string | null; assemblerName: string | null; modelName: string; revisionNumber: number; optionName: string; optionCode: string; late: string | null; predicted: { thdPercent: number; fromMeasuredVf: boolean; harmonics: { order: number; dbc: number }[] } | null };
  testCurrentMa: number;
  fastStepPercent: number;
  steps: { id: number; position: number; title: string; instructions: string; standardMinutes: number; skill: string; safetyNote: string; soldering: boolean; startedAt: string | null; finishedAt: string | null; actualMinutes: number | null }[];
  devices: { optionDeviceId: number; side: string; position: number; name: string; kind: string; range: { min: number; max: number }; nominalVf: number; measuredVf: number | null; outOfRange: boolean; slot: { label: string; vf: number } | null }[];
  lots: { bomLineId: number; designators: string; partNumber: string; value: string; lot: string | null }[];
  photos: { id: number; url: string; caption: string }[];
  tests: { id: number; outcome: 'pass' | 'fail'; reason: string; createdAt: string }[];
  history: { id: number; kind: string; from: string | null; to: string | null; message: string; at: string; by: string | null }[];
}

const keys = {
  all: ['builds'] as const,
  mine: (params: BuildListParams) => [...keys.all, 'mine', params] as const,
  unit: (id: number) => [...keys.all, 'unit', id] as const,
};

/** What the assembler's queue asks for: sort and page (the server's defaults fill the rest). */
export type BuildListParams = Partial<BuildListQuery>;
/** One page of the assembler's own queue, in build order unless asked otherwise. */
export const myBuildsQuery = (params: BuildListParams) =>
  queryOptions({ queryKey: keys.mine(params), queryFn: () => api.get<Page<BuildRow>>(`/api/builds${listSearch(params)}`), placeholderData: keepPreviousData });
export const buildUnitQuery = (id: number) => queryOptions({ queryKey: keys.unit(id), queryFn: () => api.get<UnitDetail>(`/api/units/${id}`) });
export const useMyBuilds = (params: BuildListParams) => useQuery(myBuildsQuery(params));
export const useBuildUnit = (id: number) => useQuery(buildUnitQuery(id));

function useUnitMutation<I, O>(fn: (input: I) => Promise<O>) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => client.invalidateQueries({ queryKey: keys.all }) });
}

export const useStep = (unitId: number) => useUnitMutation(({ stepId, action, confirmFast }: { stepId: number; action: 'start' | 'finish'; confirmFast?: boolean }) =>
  api.post<{ actualMinutes?: number; standardMinutes?: number }>(`/api/units/${unitId}/steps/${stepId}/${action}`, action === 'finish' ? { confirmFast: confirmFast ?? false } : {}));
export const useReopenStep = (unitId: number) => useUnitMutation(({ stepId, reason }: { stepId: number; reason: string }) =>
  api.post(`/api/units/${unitId}/steps/${stepId}/reopen`, { reason }));
export const useSaveReadings = (unitId: number) => useUnitMutation((input: DeviceReadingsInput) => api.put<{ predicted: { thdPercent: number }; flagged: number[] }>(`/api/units/${unitId}/devices`, input));
export const useSaveLots = (unitId: number) => useUnitMutation((input: PartLotsInput) => api.put(`/api/units/${unitId}/lots`, input));
export const useAddPhoto = (unitId: number) => useUnitMutation((form: FormData) => api.post(`/api/units/${unitId}/photos`, form));
export const useMarkBuilt = (unitId: number) => useUnitMutation(() => api.post(`/api/units/${unitId}/built`));
