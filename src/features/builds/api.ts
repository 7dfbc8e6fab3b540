import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { DeviceReadingsInput, PartLotsInput } from '../../../shared/schemas/production';
import type { UnitState } from '../../../shared/production/states';
import { api } from '../../lib/api';

export interface BuildRow { id: number; serial: string; state: UnitState; plannedDate: string | null; kitted: boolean; modelName: string; optionName: string; steps: number; stepsDone: number; late: string | null }
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
  mine: () => [...keys.all, 'mine'] as const,
  unit: (id: number) => [...keys.all, 'unit', id] as const,
};

export const myBuildsQuery = () => queryOptions({ queryKey: keys.mine(), queryFn: () => api.get<{ builds: BuildRow[] }>('/api/builds').then((b) => b.builds) });
export const buildUnitQuery = (id: number) => queryOptions({ queryKey: keys.unit(id), queryFn: () => api.get<UnitDetail>(`/api/units/${id}`) });
export const useMyBuilds = () => useQuery(myBuildsQuery());
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
