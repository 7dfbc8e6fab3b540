import { z } from 'zod';

/** A unit's serial as it appears in a path, e.g. HM-B0007-012K (letters, digits and dashes). */
export const serialParamSchema = z.string().trim().min(3, 'A serial has at least 3 characters').max(40, 'A serial has at most 40 characters')
  .regex(/^[A-Za-z0-9-]+$/, 'A serial is letters, digits and dashes');
