/**
 * The server's typed errors. Every failure a client can cause is an HttpError with a stable `code`;
 * the HTTP layer turns it into `{"error":{"code","message"}}` with `status`, and the sync upgrade into
 * the matching status line.
 */
export type ErrorCode =
  | 'bad_request'
  | 'invalid_body'
  | 'invalid_json'
  | 'body_too_large'
  | 'unauthenticated'
  | 'invalid_credentials'
  | 'rate_limited'
  | 'forbidden'
  | 'bad_origin'
  | 'not_found'
  | 'conflict'
  | 'last_owner'
  | 'already_set_up'
  | 'bad_setup_code'
  | 'link_used'
  | 'link_expired'
  | 'not_ready'
  | 'document_replaced'
  | 'nothing_to_purge'
  | 'internal';

export class HttpError extends Error {
  constructor(
    readonly status: 400 | 401 | 403 | 404 | 409 | 410 | 413 | 415 | 429 | 500 | 503,
    readonly code: ErrorCode,
    message: string,
    /** Extra response headers (Retry-After on 429). */
    readonly headers: Record<string, string> = {},
    /** Field-level details for validation errors. */
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, details?: unknown) => new HttpError(400, 'invalid_body', message, {}, details);
export const unauthenticated = (message = 'Sign in first.') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'Your role in this study does not allow that.') => new HttpError(403, 'forbidden', message);
export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} not found.`);
export const conflict = (message: string) => new HttpError(409, 'conflict', message);

/** Configuration problems found at start: the process should stop with a clear message. */
export class ConfigError extends Error {
  readonly code = 'bad_config';
  constructor(message: string) {
    super(message);
    this.name = 'ConfigError';
  }
}
