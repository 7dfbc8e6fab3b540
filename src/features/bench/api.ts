import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
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

const keys = { all: ['bench'] as const, queue: () => ['bench', 'queue'] as const, unit: (id: number) => ['bench', 'unit', id] as const };

export const benchQueueQuery = () => queryOptions({ queryKey: keys.queue(), queryFn: () => api.get<{ units: BenchRow[] }>('/api/bench').then((b) => b.units) });
export const testUnitQuery = (id: number) => queryOptions({ queryKey: keys.unit(id), queryFn: () => api.get<TestUnit>(`/api/units/${id}`) });
export const useBenchQueue = () => useQuery(benchQueueQuery());
export const useTestUnit = (id: number) => useQuery(testUnitQuery(id));

export function useRecordTest(unitId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (form: FormData) => api.post<{ unitState: UnitState; withinTolerance: boolean; predictedThdPercent: number; capture: CaptureAnalysis | null }>(`/api/units/${unitId}/tests`, form),
    onSuccess: () => client.invalidateQueries({ queryKey: keys.all }),
  });
}
