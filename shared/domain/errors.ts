/**
 * Machine codes for input the domain refuses. The API maps a DomainError to a field error using
 * `field`, so the code says what is wrong and the field says where.
 */
export const DOMAIN_ERROR_CODES = [
  'not-finite',
  'non-positive-mass',
  'non-positive-volume',
  'non-positive-density',
  'non-positive-value',
  'mass-below-dry',
  'mass-above-soaked',
  'no-uptake',
  'moisture-out-of-range',
  'sg-out-of-range',
  'rh-out-of-range',
  'temperature-out-of-range',
  'altitude-out-of-range',
  'negative-pressure',
  'pressure-out-of-range',
  'vacuum-exceeds-ambient',
  'negative-value',
  'invalid-date',
  'too-few-points',
  'length-mismatch',
  'no-variation',
  'rank-deficient',
] as const;

export type DomainErrorCode = (typeof DOMAIN_ERROR_CODES)[number];

/**
 * Thrown instead of returning a number when the input is physically impossible or the
 * computation is undefined for it. Never thrown for merely unusual values.
 */
export class DomainError extends Error {
  override readonly name = 'DomainError';
  readonly code: DomainErrorCode;
  /** Name of the offending argument (or option), as spelled in the function signature. */
  readonly field: string;
  /** Position in the array argument, when the offending value is one element of it. */
  readonly index: number | undefined;

  constructor(code: DomainErrorCode, field: string, message: string, index?: number) {
    super(message);
    this.code = code;
    this.field = field;
    this.index = index;
  }
}

/** Number.isFinite also rejects non-numbers that slipped past the type system (e.g. from JSON). */
export function requireFinite(value: number, field: string, index?: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    const where = index === undefined ? field : `${field}[${index}]`;
    throw new DomainError('not-finite', field, `${where} must be a finite number`, index);
  }
  return value;
}

export function requirePositiveMass(value: number, field: string, index?: number): number {
  requireFinite(value, field, index);
  if (value <= 0) throw new DomainError('non-positive-mass', field, `${field} must be greater than 0 g`, index);
  return value;
}

export function requirePositiveVolume(value: number, field: string): number {
  requireFinite(value, field);
  if (value <= 0) throw new DomainError('non-positive-volume', field, `${field} must be greater than 0`);
  return value;
}

export function requirePositiveDensity(value: number, field: string): number {
  requireFinite(value, field);
  if (value <= 0) throw new DomainError('non-positive-density', field, `${field} must be greater than 0 g/cm³`);
  return value;
}

export function requireFiniteArray(values: readonly number[], field: string, minLength: number): void {
  if (!Array.isArray(values) || values.length < minLength) {
    throw new DomainError('too-few-points', field, `${field} needs at least ${minLength} values`);
  }
  values.forEach((v, i) => requireFinite(v, field, i));
}
