/** Typed errors of the sync layer. `closeCode` is the WebSocket close code sent to the offending peer. */
export type SyncErrorCode =
  | 'malformed-message'
  | 'unsupported-message'
  | 'invalid-update'
  | 'invalid-awareness'
  | 'presence-too-large'
  | 'presence-taken'
  | 'store-failed'
  | 'retired-copy'

  | 'server-busy'
  | 'too-many-messages'
  | 'too-much-pending'
  | 'room-unavailable';

export class SyncError extends Error {
  readonly code: SyncErrorCode;
  readonly closeCode: number;
  constructor(code: SyncErrorCode, message: string, closeCode: number, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'SyncError';
    this.code = code;
    this.closeCode = closeCode;
  }
}

/** RFC 6455 close codes used here. */
export const CloseCode = {
  unsupportedData: 1003,
  invalidPayload: 1007,
  policyViolation: 1008,
  tooBig: 1009,
  internalError: 1011,
  tryAgainLater: 1013,
  goingAway: 1001,
} as const;

/**
 * Application close codes (RFC 6455 §7.4.2 leaves 4000–4999 to applications); the numbers echo the
 * HTTP statuses they mean. A client must not reconnect to the room with the copy it holds after any of them.
 */
export const AppCloseCode = {
  /** The document was deleted (with its text or study). */
  deleted: 4404,
  /** The document was rebuilt under a new room (a de-identification purge): discard the local copy and reload. */
  replaced: 4410,
  /**
   * The memos this reader may receive changed (a text assigned or unassigned, a round started or
   * revealed): the copy the client holds was filtered for the old view, so it is discarded and fetched afresh.
   */
  viewChanged: 4409,
} as const;
