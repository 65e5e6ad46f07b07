/** Why a piece of input was refused. Callers branch on `code`, never on the message. */
export type AgreementErrorCode =
  | 'invalid-input'
  | 'invalid-value'
  | 'mixed-value-types'
  | 'not-numeric'
  | 'ordinal-needs-order'
  | 'not-square'
  | 'unequal-raters'
  | 'overlapping-units'
  | 'span-outside-continuum'
  | 'too-many-coders';

export class AgreementError extends Error {
  readonly code: AgreementErrorCode;
  constructor(code: AgreementErrorCode, message: string) {
    super(message);
    this.name = 'AgreementError';
    this.code = code;
  }
}

/**
 * A refused input value, for an error message. Template literals call toString/valueOf, which junk
 * input can break (`{toString: 0}` throws a TypeError): describe it without running its code.
 */
export function shown(v: unknown): string {
  if (typeof v === 'number' || typeof v === 'boolean' || typeof v === 'bigint' || v === null || v === undefined) return String(v);
  if (typeof v === 'string') return JSON.stringify(v);
  return Array.isArray(v) ? 'an array' : `a ${typeof v}`;
}
