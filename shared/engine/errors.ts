/** Shape every engine error serialises to, e.g. {message: "…", path: "clipper.positive[0].is"}. */
export interface EngineErrorBody {
  message: string;
  path: string;
}

/** Invalid input: carries the field path and a message naming the bound and the actual value. */
export class EngineInputError extends Error {
  readonly path: string;
  readonly code = 'invalid_input';
  constructor(path: string, message: string) {
    super(message);
    this.name = 'EngineInputError';
    this.path = path;
  }
  /** The contract's error body, e.g. {message, path}. */
  toJSON(): EngineErrorBody {
    return { message: this.message, path: this.path };
  }
}

/** A solve that did not converge; the engine throws this rather than return NaN. */
export class SolverError extends Error {
  readonly path: string;
  readonly code = 'no_convergence';
  constructor(message: string, path = '') {
    super(message);
    this.name = 'SolverError';
    this.path = path;
  }
  /** The contract's error body, e.g. {message, path: ""}. */
  toJSON(): EngineErrorBody {
    return { message: this.message, path: this.path };
  }
}

/** Throws unless value is a finite number within [min, max], e.g. checkRange(1.75, 0.5, 10, 'n'). */
export function checkRange(value: number, min: number, max: number, path: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new EngineInputError(path, `${path} must be a finite number, got ${String(value)}`);
  }
  if (value < min) throw new EngineInputError(path, `${path} must be ≥ ${min}, got ${value}`);
  if (value > max) throw new EngineInputError(path, `${path} must be ≤ ${max}, got ${value}`);
  return value;
}

/** Throws unless value is a finite number with min < value ≤ max, e.g. checkPositive(2200, 'seriesOhms'). */
export function checkPositive(value: number, path: string, max = Number.MAX_VALUE): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new EngineInputError(path, `${path} must be a finite number, got ${String(value)}`);
  }
  if (!(value > 0)) throw new EngineInputError(path, `${path} must be > 0, got ${value}`);
  if (value > max) throw new EngineInputError(path, `${path} must be ≤ ${max}, got ${value}`);
  return value;
}
