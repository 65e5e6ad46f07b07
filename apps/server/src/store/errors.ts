/** Typed failures of the update store. */
export class StoreError extends Error {
  constructor(
    /** `document-gone`: the document was deleted or retired by a purge; this append was refused, others of its batch stored. */
    readonly code: 'store-closed' | 'append-failed' | 'load-failed' | 'document-gone' | 'compaction-failed',
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'StoreError';
  }
}
