import { z } from 'zod';

/** A unit's serial as it appears in a path, e.g. HM-B0007-012K (letters, digits and dashes). */
export const serialParamSchema = z.string().trim().min(3, 'A serial has at least 3 characters').max(40, 'A serial has at most 40 characters')
  .regex(/^[A-Za-z0-9-]+$/, 'A serial is letters, digits and dashes');

/** A batch's spec-sheet job as the API reports it (progress survives reloads: it lives in PostgreSQL). */
export interface SheetJobView {
  id: number;
  batchId: number;
  state: 'queued' | 'running' | 'finished' | 'failed';
  total: number;
  done: number;
  failures: { serial: string; reason: string }[];
  archiveReady: boolean;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
}
