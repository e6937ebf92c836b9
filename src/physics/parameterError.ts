// A parameter a user supplied is out of range or unknown. The physics core is pure and does
// not know about exit codes; the command line maps this error to "bad input" (exit code 2).
// The message always names the parameter and says what to change.

export class ParameterError extends Error {
  readonly parameter: string;

  constructor(parameter: string, message: string) {
    super(`${parameter}: ${message}`);
    this.name = 'ParameterError';
    this.parameter = parameter;
  }
}

/** Throws unless value is a finite number inside [min, max]. */
export function requireFiniteInRange(
  parameter: string,
  value: number,
  min: number,
  max: number,
  unitHint: string,
): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    throw new ParameterError(
      parameter,
      `expected a number from ${min} to ${max} ${unitHint}, got ${String(value)}`,
    );
  }
}

/** Throws unless value is a finite number > 0. */
export function requirePositive(parameter: string, value: number, unitHint: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new ParameterError(parameter, `expected a positive number ${unitHint}, got ${String(value)}`);
  }
}
