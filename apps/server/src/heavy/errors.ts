/**
 * Why heavy work (a report with bootstrap, a file read, an export) did not finish. Mapped to HTTP at
 * the edge (http/errors.ts): `busy` and `timed_out` are 503 with Retry-After, `out_of_memory` 413
 * (the input is too big for the worker's memory), `failed` 500.
 */
export type HeavyErrorCode = 'busy' | 'timed_out' | 'out_of_memory' | 'failed';

export class HeavyError extends Error {
  constructor(
    readonly code: HeavyErrorCode,
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'HeavyError';
  }
}
