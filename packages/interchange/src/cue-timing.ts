/** What the SRT and WebVTT importers share when they quote and check a cue timing line. */
import { formatMs } from './clock.js';
import { ImportError, type ImportFormat } from './import-error.js';

/** A line quoted in an error message, shortened to 60 characters. */
export function clip(s: string): string {
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

/** Refuses a cue that ends before it starts; `shown` is the timing as the message quotes it. */
export function requireCueOrder(format: ImportFormat, lineNo: number, shown: string, startMs: number, endMs: number): void {
  if (endMs >= startMs) return;
  throw new ImportError({
    code: 'timing_order',
    format,
    line: lineNo,
    message: `cue timing '${clip(shown)}' ends before it starts (${formatMs(endMs)} < ${formatMs(startMs)})`,
  });
}
