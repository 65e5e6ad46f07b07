/** One JSON line per event on stderr, filtered by LOG_LEVEL; shaped like pino's so the sync layer can use it. */
import type { LogLevel } from './config.js';

export interface Logger {
  debug(obj: object, msg?: string): void;
  info(obj: object, msg?: string): void;
  warn(obj: object, msg?: string): void;
  error(obj: object, msg?: string): void;
}

const ORDER: Record<LogLevel, number> = { debug: 10, info: 20, warn: 30, error: 40, silent: 99 };

function serialise(obj: object): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(obj)) out[k] = v instanceof Error ? { name: v.name, message: v.message, stack: v.stack, code: (v as { code?: unknown }).code } : v;
  return out;
}

export function createLogger(level: LogLevel, write: (line: string) => void = (l) => process.stderr.write(l + '\n')): Logger {
  const at = (name: Exclude<LogLevel, 'silent'>) => (obj: object, msg?: string) => {
    if (ORDER[name] < ORDER[level]) return;
    write(JSON.stringify({ level: name, time: new Date().toISOString(), ...serialise(obj), ...(msg ? { msg } : {}) }));
  };
  return { debug: at('debug'), info: at('info'), warn: at('warn'), error: at('error') };
}
