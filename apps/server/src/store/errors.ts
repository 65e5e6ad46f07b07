/** Typed failures of the update store. */
export class StoreError extends Error {
  constructor(
    readonly code: 'store-closed' | 'append-failed' | 'load-failed',
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'StoreError';
  }
}
