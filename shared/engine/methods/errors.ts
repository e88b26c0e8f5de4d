import type { ErrorCode } from '../result';

/**
 * Bad input to a method. `field` names the method argument ("values", "level", "sigma0", ...);
 * the step runner maps it to the step's parameter path and names the step in the message.
 */
export class MethodInputError extends Error {
  constructor(
    readonly code: ErrorCode,
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = 'MethodInputError';
  }
}

export function requireProbability(value: number, field: string, what = 'confidence level'): void {
  if (!Number.isFinite(value) || value <= 0 || value >= 1) {
    throw new MethodInputError('invalid-parameter', field, `the ${what} must lie strictly between 0 and 1 (got ${value})`);
  }
}

export function requirePositive(value: number, field: string, what: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new MethodInputError('invalid-parameter', field, `${what} must be a positive number (got ${value})`);
  }
}
