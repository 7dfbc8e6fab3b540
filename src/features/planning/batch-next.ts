import type { BatchDetail } from './api';

export interface NextAction {
  /** What the planner does next, in a sentence. */
  text: string;
  /** The page section where it is done (its anchor id), when there is one. */
  section?: string;
  /** The button that goes there. */
  go?: string;
}

/** The batch's next action from its state and progress: one sentence and where on the page it is done. */
export function nextAction(d: BatchDetail): NextAction {
  const short = d.requirements.filter((r) => r.shortage > 0).length;
  const open = d.units.filter((u) => u.state !== 'cancelled');
  switch (d.batch.state) {
    case 'draft':
      return short
        ? { text: `${short} part${short === 1 ? ' is' : 's are'} short: order ${short === 1 ? 'it' : 'them'} from the purchase list, or release with a reason.`, section: 'parts', go: 'See what is short' }
        : { text: 'Every part is covered: check what it builds, then release it to the bench.', section: 'release', go: 'Go to release' };
    case 'releasing':
      return { text: 'Its units are being created; kitting and assignment open once all exist.', section: 'releasing', go: 'See progress' };
    case 'released':
    case 'on_bench': {
      const unkitted = open.filter((u) => !u.kitted && ['waiting', 'building'].includes(u.state)).length;
      if (unkitted) return { text: `${unkitted} unit${unkitted === 1 ? '' : 's'} still to kit.`, section: 'kitting', go: 'Go to kitting' };
      const unassigned = open.filter((u) => u.assemblerId === null && ['waiting', 'rework'].includes(u.state)).length;
      if (unassigned) return { text: `${unassigned} unit${unassigned === 1 ? '' : 's'} without an assembler.`, section: 'assign', go: 'Go to assignment' };
      return { text: 'Every unit is kitted and assigned: the bench takes it from here.', section: 'assign', go: 'See the units' };
    }
    case 'closed':
      return { text: 'Every unit is finished: nothing left to do.' };
    case 'cancelled':
      return { text: 'This batch was cancelled: nothing left to do.' };
  }
}
