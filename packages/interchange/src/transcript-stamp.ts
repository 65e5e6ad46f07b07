import { clockToMs, fractionToMs } from './clock.js';

/**
 * A bracketed transcript timestamp: `[h:mm:ss]`, `[mm:ss]`, `(mm:ss)`, `[hh:mm:ss.mmm]` (a comma is
 * accepted for the decimal mark). Two fields are minutes and seconds, three are hours, minutes, seconds.
 */
const STAMP = /^(?:\[\s*(\d{1,2}):(\d{2})(?::(\d{2}))?(?:[.,](\d{1,3}))?\s*\]|\(\s*(\d{1,2}):(\d{2})(?::(\d{2}))?(?:[.,](\d{1,3}))?\s*\))/;

export type StampMatch =
  | { ok: true; ms: number; length: number }
  | { ok: false; length: number; text: string };

/** The timestamp at the start of `s`; `ok: false` when it has the shape of one but is out of range. */
export function matchStamp(s: string): StampMatch | null {
  const m = STAMP.exec(s);
  if (!m) return null;
  const g = m[1] !== undefined ? m.slice(1, 5) : m.slice(5, 9);
  const [a, b, c, frac] = g;
  const ms =
    c === undefined
      ? clockToMs(0, Number(a), Number(b), fractionToMs(frac))
      : clockToMs(Number(a), Number(b), Number(c), fractionToMs(frac));
  return ms === null ? { ok: false, length: m[0].length, text: m[0] } : { ok: true, ms, length: m[0].length };
}
