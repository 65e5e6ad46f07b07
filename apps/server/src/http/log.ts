/** The logger routes use: the server's, or a default one at info level (bare app tests). */
import { createLogger, type Logger } from '../logger.js';
import type { AppDeps } from './context.js';

let fallback: Logger | undefined;
export function logFor(deps: Pick<AppDeps, 'logger'>): Logger {
  return deps.logger ?? (fallback ??= createLogger('info'));
}
