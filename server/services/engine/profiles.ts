import { EngineInputError, runContract, SolverError } from '../../../shared/engine';
import { DomainError, invalid } from '../../errors';

/**
 * One operating point per the engine's contract (the same JSON the CLI takes). Invalid input is a
 * 400 naming the field path; a solve that does not converge is a 422, never NaN.
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
