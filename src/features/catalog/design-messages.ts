import type { DesignCandidate } from '../../../shared/design/search';
import type { SweepPoint } from '../../../shared/engine/index';

export type DesignRequest =
  | { id: number; kind: 'run'; input: unknown; drive: unknown }
  | { id: number; kind: 'cancel' };

export interface DesignedCandidate extends DesignCandidate { sweep: SweepPoint[] }

export type DesignResponse =
  | { id: number; kind: 'progress'; done: number; total: number }
  | { id: number; kind: 'done'; searched: number; total: number; cancelled: boolean; msPerCandidate: number; candidates: DesignedCandidate[] }
  | { id: number; kind: 'error'; message: string; path: string };
