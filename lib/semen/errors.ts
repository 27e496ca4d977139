/** Why an input to a semen computation was refused; `field` names the offending input. */
export type SemenInputErrorCode =
  | 'not-finite'
  | 'negative'
  | 'not-positive'
  | 'not-integer'
  | 'out-of-range';

/** Thrown by lib/semen/* for input no lab could have measured (callers map it to a 422). */
export class SemenInputError extends RangeError {
  readonly code: SemenInputErrorCode;
  readonly field: string;

  constructor(field: string, code: SemenInputErrorCode, message: string) {
    super(`${field}: ${message}`);
    this.name = 'SemenInputError';
    this.field = field;
    this.code = code;
  }
}

export function requireFinite(field: string, value: number): void {
  if (!Number.isFinite(value)) throw new SemenInputError(field, 'not-finite', 'must be a finite number');
}

export function requireNonNegative(field: string, value: number): void {
  requireFinite(field, value);
  if (value < 0) throw new SemenInputError(field, 'negative', 'must not be negative');
}

export function requirePositive(field: string, value: number): void {
  requireFinite(field, value);
  if (value <= 0) throw new SemenInputError(field, 'not-positive', 'must be greater than zero');
}

export function requirePercent(field: string, value: number): void {
  requireFinite(field, value);
  if (value < 0 || value > 100) throw new SemenInputError(field, 'out-of-range', 'must be between 0 and 100 %');
}
