import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, type Page } from '../../../shared/schemas/list';
import type { BenchListQuery } from '../../../shared/schemas/production';
import type { UnitState } from '../../../shared/production/states';
import type { CaptureComparison, CaptureReading, MeasuredHarmonic, PredictionAtReference, StoredPrediction } from '../../../shared/production/capture-check';
import { api } from '../../lib/api';

export interface BenchRow { id: number; serial: string; modelName: string; optionName: string; assemblerName: string | null; builtAt: string }
/** A capture as stored with a test; ones saved before THD_R was kept carry `thdPercent` instead of `thdFPercent`. */
export type StoredCapture = Pick<CaptureReading, 'sampleRate' | 'channels' | 'durationS' | 'fundamentalHz'> & { thdFPercent?: number; thdPercent?: number };
export interface TestRecord {
  id: number; testerName: string | null; currentDrawMa: number; measuredThdPercent: number; predictedThdPercent: number | null; tolerancePercent: number;
  harmonicToleranceDb: number | null; withinTolerance: boolean | null; outcome: 'pass' | 'fail'; reason: string; capture: StoredCapture | null;
  measuredHarmonics: MeasuredHarmonic[] | null; measuredThdRPercent: number | null; createdAt: string;
}
/** `POST /api/captures/analyse` with a unitId: the reading, the unit's prediction and the comparison. */
export type UnitCaptureAnalysis = CaptureReading & { unit: { id: number; serial: string }; prediction: PredictionAtReference; comparison: CaptureComparison };
export interface TestUnit {
  unit: { id: number; serial: string; state: UnitState; modelName: string; revisionNumber: number; optionName: string; assemblerName: string | null; referenceDrive: number; supplyV: number; predicted: (StoredPrediction & { fromMeasuredVf: boolean }) | null };
  thdTolerancePercent: number;
  harmonicToleranceDb: number;
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
    mutationFn: (form: FormData) => api.post<{ unitState: UnitState; withinTolerance: boolean; measuredThdPercent: number; predictedThdPercent: number; capture: CaptureReading | null; comparison: CaptureComparison }>(`/api/units/${unitId}/tests`, form),
    onSuccess: () => client.invalidateQueries({ queryKey: keys.all }),
  });
}

/** Reads a capture against a unit's prediction; records nothing (the test is saved separately). */
export function useAnalyseCapture(unitId: number) {
  return useMutation({
    mutationFn: (file: File) => {
      const form = new FormData();
      form.append('unitId', String(unitId));
      form.append('capture', file);
      return api.post<UnitCaptureAnalysis>('/api/captures/analyse', form);
    },
  });
}
