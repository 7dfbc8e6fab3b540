import { z } from 'zod';
import { TRAY_MAX_SLOTS } from '../production/trays';
import { dateSchema, id as idOf, str } from './common';
import { listQuery } from './list';

// Request shapes of trays (measured device lots) and of matching a batch's devices from them.
export const createTraySchema = z.object({
  deviceId: idOf('Choose the device'),
  supplierLot: str().trim().min(1, 'Enter the supplier’s lot').max(80, 'Use at most 80 characters'),
  receivedOn: dateSchema('2026-12-04'),
  notes: str().trim().max(2000, 'Use at most 2000 characters').default(''),
});
export type CreateTrayInput = z.infer<typeof createTraySchema>;

const slotNumber = z.coerce.number({ error: 'Enter the slot number' }).int('Whole slot numbers only').min(1, 'Slots start at 1').max(TRAY_MAX_SLOTS, `At most ${TRAY_MAX_SLOTS} slots`);

/** Readings to save; a null reading clears that slot (if no unit has it). */
export const trayReadingsSchema = z.object({
  readings: z.array(z.object({
    slot: slotNumber,
    vf: z.union([z.null(), z.coerce.number({ error: 'Enter the voltage' }).positive('Enter a positive voltage').max(10, 'At most 10 V')]),
  })).min(1, 'Enter at least one reading').max(TRAY_MAX_SLOTS, `At most ${TRAY_MAX_SLOTS} readings at once`),
}).superRefine((b, ctx) => {
  const seen = new Set<number>();
  b.readings.forEach((r, i) => {
    if (seen.has(r.slot)) ctx.addIssue({ code: 'custom', path: ['readings', i, 'slot'], message: `Slot ${r.slot} appears twice` });
    seen.add(r.slot);
  });
});
export type TrayReadingsInput = z.infer<typeof trayReadingsSchema>;

/** Multipart fields of a meter CSV import (the file is `file`). */
export const trayImportSchema = z.object({ firstSlot: slotNumber.default(1) });

export const trayListSchema = listQuery(['receivedOn', 'id', 'deviceName', 'supplierLot'] as const, { sort: 'receivedOn', dir: 'desc' }, {
  deviceId: idOf('Choose a device').optional(),
});
export type TrayListQuery = z.infer<typeof trayListSchema>;

/** Which trays a batch's matching may take from; none named = every tray of the devices it needs. */
export const matchProposalSchema = z.object({
  trayIds: z.array(idOf('Choose a tray')).max(50, 'At most 50 trays').default([]),
});
export type MatchProposalInput = z.infer<typeof matchProposalSchema>;

/** Accepting a proposal: for each unit, which slot goes into which of its option's device positions. */
export const acceptMatchSchema = z.object({
  units: z.array(z.object({
    unitId: idOf('Choose a unit'),
    slots: z.array(z.object({ optionDeviceId: idOf('Choose a device position'), slotId: idOf('Choose a slot') })).min(1).max(12),
  })).min(1, 'Accept at least one unit').max(500),
});
export type AcceptMatchInput = z.infer<typeof acceptMatchSchema>;
