/**
 * Input checking shared by every calculation. A calculation never guesses around bad input:
 * it throws a CalcInputError naming the field, so the planner can point at the box to fix.
 */

/** Thrown when a calculation input is missing, non-finite, out of range or physically impossible. */
export class CalcInputError extends Error {
  /** The name of the offending input, as spelled in the function's parameter object. */
  readonly field: string;

  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'CalcInputError';
    this.field = field;
  }
}

/** Throws unless value is a finite number. */
export function requireFinite(field: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new CalcInputError(field, `must be a finite number, got ${String(value)}`);
  }
  return value;
}

/** Throws unless value is finite and strictly greater than zero. */
export function requirePositive(field: string, value: number): number {
  requireFinite(field, value);
  if (value <= 0) throw new CalcInputError(field, `must be greater than zero, got ${value}`);
  return value;
}

/** Throws unless value is finite and zero or more. */
export function requireNonNegative(field: string, value: number): number {
  requireFinite(field, value);
  if (value < 0) throw new CalcInputError(field, `must not be negative, got ${value}`);
  return value;
}

/** Throws unless value is an integer within [min, max]. */
export function requireInteger(field: string, value: number, min: number, max = Number.MAX_SAFE_INTEGER): number {
  requireFinite(field, value);
  if (!Number.isInteger(value)) throw new CalcInputError(field, `must be a whole number, got ${value}`);
  if (value < min || value > max) {
    throw new CalcInputError(field, `must be between ${min} and ${max}, got ${value}`);
  }
  return value;
}

/** Throws unless value is finite and within [min, max] (inclusive unless told otherwise). */
export function requireInRange(
  field: string,
  value: number,
  min: number,
  max: number,
  opts: { minExclusive?: boolean; maxExclusive?: boolean } = {},
): number {
  requireFinite(field, value);
  const belowMin = opts.minExclusive ? value <= min : value < min;
  const aboveMax = opts.maxExclusive ? value >= max : value > max;
  if (belowMin || aboveMax) {
    const lo = opts.minExclusive ? '(' : '[';
    const hi = opts.maxExclusive ? ')' : ']';
    throw new CalcInputError(field, `must be within ${lo}${min}, ${max}${hi}, got ${value}`);
  }
  return value;
}

/**
 * Guards an output: finite inputs can still overflow (1e308 × 9.8), and a result must never
 * be NaN or infinite, so the overflow is reported against the input that drove it.
 */
export function finiteResult(field: string, value: number): number {
  if (!Number.isFinite(value)) {
    throw new CalcInputError(field, 'is too large: the result is not a finite number');
  }
  return value;
}
