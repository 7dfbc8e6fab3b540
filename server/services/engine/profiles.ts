import { EngineInputError, runContract, SolverError } from '../../../shared/engine';
import { compute } from '../../compute/pool';
import { DomainError, invalid } from '../../errors';

/**
 * One operating point per the engine's contract (the same JSON the CLI takes). Invalid input is a
 * 400 naming the field path; a solve that does not converge is a 422, never NaN. Runs where it is
 * called: requests go through `requestProfile`, which runs it in the compute pool.
 */
export function computeContractProfile(body: unknown) {
  try {
    return runContract(body);
  } catch (error) {
    if (error instanceof EngineInputError) throw invalid(error.message, { [error.path || '_']: error.message });
    if (error instanceof SolverError) throw new DomainError(422, 'no_convergence', error.message);
    throw error;
  }
}

/** Cost units: one is a static network of identical devices (~5 ms here); see profileCost. */
export const PROFILE_COST = {
  /** Each distinct device of a string adds this much: identical devices in a string are merged into one solve. */
  perDistinctDevice: 1 / 8,
  /** A capacitor turns the static solve into a transient one with periodic-steady-state shooting. */
  capacitorFactor: 10,
} as const;

const list = (x: unknown) => (Array.isArray(x) ? x : []);
const positive = (x: unknown) => typeof x === 'number' && x > 0;

/**
 * The estimated engine cost of a contract body, read before any work, never throwing on odd input
 * (validation is the engine's). Measured on this machine: a static pair ≈ 5 ms, 40 distinct devices
 * ≈ 50 ms, a capacitor ×5–20, both ≈ 130–210 ms. Harmonics (FFT of a fixed 1,024 points) cost nothing.
 * E.g. a silicon/LED pair with a shunt capacitor = (1 + 2/8) × 10 = 12.5.
 */
export function profileCost(body: unknown) {
  const clipper = (body && typeof body === 'object' ? (body as Record<string, unknown>).clipper : null) as Record<string, unknown> | null;
  if (!clipper || typeof clipper !== 'object') return 1;
  // Identical devices merge within a string, not across the two.
  const distinctIn = (string: unknown) => new Set(list(string).map((d) => JSON.stringify(d))).size;
  const distinct = distinctIn(clipper.positive) + distinctIn(clipper.negative);
  const capacitor = positive(clipper.shuntFarads) || positive(clipper.feedbackFarads);
  return (1 + distinct * PROFILE_COST.perDistinctDevice) * (capacitor ? PROFILE_COST.capacitorFactor : 1);
}

/** POST /api/profiles: refuses a body above the cost cap with a 400 that states the limit, else computes it in the pool. */
export async function requestProfile(body: unknown, maxCost: number) {
  const cost = profileCost(body);
  if (cost > maxCost) {
    const message = `This circuit is estimated at ${cost.toFixed(1)} cost units and the limit is ${maxCost}: `
      + `each different device adds ${PROFILE_COST.perDistinctDevice}, a capacitor multiplies by ${PROFILE_COST.capacitorFactor}. Use fewer different devices or no capacitor`;
    throw invalid(message, { clipper: message });
  }
  return compute.contractProfile(body);
}
