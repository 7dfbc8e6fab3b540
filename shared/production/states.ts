// Batch and unit states of Kneepoint's own, with the changes allowed between them. The server
// enforces these (an illegal change is a 409); the client uses the labels.
export const BATCH_STATES = ['draft', 'releasing', 'released', 'on_bench', 'closed', 'cancelled'] as const;
export type BatchState = (typeof BATCH_STATES)[number];

export const BATCH_STATE_LABELS: Record<BatchState, string> = {
  draft: 'Being planned',
  releasing: 'Creating its units',
  released: 'Released to the bench',
  on_bench: 'Builds under way',
  closed: 'Closed',
  cancelled: 'Cancelled',
};

export const BATCH_TRANSITIONS: Record<BatchState, readonly BatchState[]> = {
  // A batch bigger than one chunk goes through 'releasing' while a job creates its units.
  draft: ['releasing', 'released', 'cancelled'],
  releasing: ['released'],
  released: ['on_bench', 'cancelled'],
  on_bench: ['closed'],
  closed: [],
  cancelled: [],
};

export const UNIT_STATES = ['waiting', 'building', 'built', 'rework', 'passed', 'in_stock', 'shipped', 'cancelled'] as const;
export type UnitState = (typeof UNIT_STATES)[number];

export const UNIT_STATE_LABELS: Record<UnitState, string> = {
  waiting: 'Waiting to be built',
  building: 'On the bench',
  built: 'Built, awaiting test',
  rework: 'Back for rework',
  passed: 'Passed test',
  in_stock: 'In finished stock',
  shipped: 'Shipped',
  cancelled: 'Cancelled',
};

export const UNIT_TRANSITIONS: Record<UnitState, readonly UnitState[]> = {
  waiting: ['building', 'cancelled'],
  building: ['built', 'cancelled'],
  built: ['passed', 'rework'],
  rework: ['built'],
  passed: ['shipped', 'in_stock'],
  in_stock: ['passed'], // taken from finished stock for an order, then shipped with it
  shipped: [],
  cancelled: [],
};

/** A unit still counted as work in progress (not finished, not cancelled). */
export const OPEN_UNIT_STATES: readonly UnitState[] = ['waiting', 'building', 'built', 'rework'];
