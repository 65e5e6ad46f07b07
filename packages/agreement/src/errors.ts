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
