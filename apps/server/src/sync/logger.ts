/** The little the sync layer needs to report; pino-compatible. */
export interface SyncLogger {
  /** Expected events worth a trace when debugging (clients hanging up mid-handshake). */
  debug?(obj: object, msg?: string): void;
  warn(obj: object, msg?: string): void;
  error(obj: object, msg?: string): void;
}

export const consoleLogger: SyncLogger = {
  warn: (obj, msg) => console.warn(msg ?? '', obj),
  error: (obj, msg) => console.error(msg ?? '', obj),
};
