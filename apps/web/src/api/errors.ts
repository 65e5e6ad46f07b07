/** Every failed API call becomes an ApiError carrying the server's `{error:{code,message}}`. */
export class ApiError extends Error {
  readonly code: string;
  readonly status: number;
  constructor(code: string, message: string, status: number) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.status = status;
  }
}

/** The network itself failed (offline, server down): distinct from a refusal by the server. */
export class NetworkError extends Error {
  readonly code = 'network';
  constructor(cause: unknown) {
    super('The server could not be reached. Check your connection.');
    this.name = 'NetworkError';
    this.cause = cause;
  }
}

export function errorMessage(err: unknown): string {
  if (err instanceof ApiError || err instanceof NetworkError) return err.message;
  return err instanceof Error ? err.message : String(err);
}
