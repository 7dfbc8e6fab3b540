import { designSearch, parseDesignInput, type DesignResult } from '../../../shared/design/search';
import { EngineInputError } from '../../../shared/engine';
import { compute } from '../../compute/pool';
import { DomainError, invalid } from '../../errors';

/** Parses design JSON (designInputSchema and the candidate bound), or throws a 400 naming the field path (`_`: the space as a whole). */
function parsedOr400(body: unknown) {
  try {
    return parseDesignInput(body);
  } catch (error) {
    if (error instanceof EngineInputError) throw invalid(error.message, { [error.path || '_']: error.message });
    throw error;
  }
}

/**
 * The option designer's search, the same function and input as `npm run design`, answering the CLI's
 * output. `shouldStop` is checked between candidates; the search then ends early with `cancelled: true`.
 * Runs where it is called: requests go through `requestDesign`, which runs it in the compute pool.
 */
export function computeDesign(body: unknown, shouldStop?: () => boolean): DesignResult {
  return designSearch(parsedOr400(body), { shouldStop });
}

/**
 * A search holds one pool thread until it ends (up to DESIGN_LIMITS.candidates candidates, minutes for
 * the largest), so one runs at a time in this process; the others keep the pool's remaining threads.
 */
export const DESIGN_SEARCHES_AT_ONCE = 1;
let running = 0;

/** Design searches running in this process now, e.g. for a test that waits for one to start. */
export const runningDesignSearches = () => running;

/**
 * POST /api/designs/search: invalid input or a space above the bound is a 400 before any work; a search
 * while another runs is a 429; else the search runs in the compute pool and stops early when `signal`
 * aborts (the client went away).
 */
export async function requestDesign(body: unknown, signal?: AbortSignal): Promise<DesignResult> {
  parsedOr400(body);
  if (running >= DESIGN_SEARCHES_AT_ONCE) {
    throw new DomainError(429, 'busy', 'Another design search is running: wait for it to finish, or search in the browser');
  }
  running++;
  try {
    return await compute.designSearch(body, signal);
  } finally {
    running--;
  }
}
