import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { BenchListQuery } from '../../../shared/schemas/production';
import type { UnitState } from '../../../shared/production/states';
import type { CaptureAnalysis } from '../../../shared/production/wav-analysis';
import { api } from '../../lib/api';

export interface BenchRow { id: number; serial: string; modelName: string; optionName: string; assemblerName: string | null; builtAt: string }
export interface TestRecord { id: number; testerName: string | null; currentDrawMa: number; measuredThdPercent: number; predictedThdPercent: number | null; tolerancePercent: number; withinTolerance: boolean | null; outcome: 'pass' | 'fail'; reason: string; capture: (CaptureAnalysis & { channels: number; durationS: number }) | null; createdAt: string }
export interface TestUnit {
  unit: { id: number; serial: string; state: UnitState; modelName: string; revisionNumber: number; optionName: string; assemblerName: string | null; referenceDrive: number; supplyV: number; predicted: { thdPercent: number; fromMeasuredVf: boolean; harmonics: { order: number; dbc: number }[] } | null };
  thdTolerancePercent: number;
  devices: { optionDeviceId: number; name: string; side: string; measuredVf: number | null; nominalVf: number }[];
  tests: TestRecord[];
}

export type BenchParams = Partial<BenchListQuery>;
const keys = { all: ['bench'] as const, queues: () => ['bench', 'queue'] as const, queue: (params: BenchParams) => ['bench', 'queue', params] as const, unit: (id: number) => ['bench', 'unit', id] as const };

/** One page of units waiting for their bench test, oldest build first by default. */
export const benchQueueQuery = (params: BenchParams) => queryOptions({ queryKey: keys.queue(params), queryFn: () => api.get<Page<BenchRow>>(`/api/bench${listSearch(params)}`), placeholderData: keepPreviousData });
export const testUnitQuery = (id: number) => queryOptions({ queryKey: keys.unit(id), queryFn: () => api.get<TestUnit>(`/api/units/${id}`) });
export const useBenchQueue = (params: BenchParams) => useQuery(benchQueueQuery(params));
export const useTestUnit = (id: number) => useQuery(testUnitQuery(id));

export function useRecordTest(unitId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (form: FormData) => api.post<{ unitState: UnitState; withinTolerance: boolean; predictedThdPercent: number; capture: CaptureAnalysis | null }>(`/api/units/${unitId}/tests`, form),
    onSuccess: () => client.invalidateQueries({ queryKey: keys.all }),
  });
}
