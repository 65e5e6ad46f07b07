/** Every error the model throws carries a stable `code` so callers (server, web) can map it without parsing text. */
export type ModelErrorCode =
  | 'invalid-range'
  | 'invalid-argument'
  | 'not-found'
  | 'conflict'
  | 'foreign-anchor'
  | 'read-only';

export class ModelError extends Error {
  readonly code: ModelErrorCode;
  constructor(code: ModelErrorCode, message: string) {
    super(message);
    this.name = 'ModelError';
    this.code = code;
  }
}

/** A range outside the text, reversed, or empty. */
export class InvalidRangeError extends ModelError {
  constructor(message: string) {
    super('invalid-range', message);
    this.name = 'InvalidRangeError';
  }
}

/** An argument of the wrong shape (bad field name, bad attribute value, empty label). */
export class InvalidArgumentError extends ModelError {
  constructor(message: string) {
    super('invalid-argument', message);
    this.name = 'InvalidArgumentError';
  }
}

/** A code, segment, memo, case or attribute id that the document does not hold. */
export class NotFoundError extends ModelError {
  constructor(kind: string, id: string) {
    super('not-found', `${kind} not found: ${id}`);
    this.name = 'NotFoundError';
  }
}

/** An operation that contradicts the document's state (merging a code into itself, re-parenting into a descendant). */
export class ConflictError extends ModelError {
  constructor(message: string) {
    super('conflict', message);
    this.name = 'ConflictError';
  }
}

/** An anchor that does not point into the given text document. */
export class ForeignAnchorError extends ModelError {
  constructor(message: string) {
    super('foreign-anchor', message);
    this.name = 'ForeignAnchorError';
  }
}
