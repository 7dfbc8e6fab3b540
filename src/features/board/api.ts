import { queryOptions, useQuery } from '@tanstack/react-query';
import type { BatchState, UnitState } from '../../../shared/production/states';
import { api } from '../../lib/api';

export interface Board {
  batches: { id: number; label: string; state: BatchState; modelName: string; revisionNumber: number; units: Partial<Record<UnitState, number>> }[];
  wip: { id: number; name: string; waiting: number; building: number; rework: number }[];
  late: { id: number; serial: string; state: UnitState; plannedDate: string | null; assemblerName: string | null; orderNumber: string | null; dueAt: string | null }[];
  shortages: { batch: string; partNumber: string; description: string; shortage: number; supplier: string | null }[];
}

export const boardQuery = () => queryOptions({ queryKey: ['board', 'overview'], queryFn: () => api.get<Board>('/api/board'), refetchInterval: 60_000 });
export const useBoard = () => useQuery(boardQuery());
