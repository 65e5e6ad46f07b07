/** The little the sync layer needs to report; pino-compatible. */
import { createLogger } from '../logger.js';

export interface SyncLogger {
  /** Expected events worth a trace when debugging (clients hanging up mid-handshake). */
  debug?(obj: object, msg?: string): void;
  warn(obj: object, msg?: string): void;
  error(obj: object, msg?: string): void;
}

/** The default when no logger is passed: the server's JSON-line logger at info level (one log format). */
export const consoleLogger: SyncLogger = createLogger('info');
