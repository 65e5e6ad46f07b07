import { clockToMs, fractionToMs } from './clock.js';

/** A timestamp read from a transcript; `ok: false` when it has the shape of one but is out of range. */
export type StampMatch =
  | { ok: true; ms: number; length: number }
  | { ok: false; length: number; text: string };

/**
 * Bracketed transcript timestamps: `[h:mm:ss]`, `[mm:ss]`, `(mm:ss)`, `[hh:mm:ss.mmm]` (a comma is
 * accepted for the decimal mark). Two fields are minutes and seconds, three are hours, minutes, seconds.
 */
const BRACKETED = /^(?:\[\s*(\d{1,2}):(\d{2})(?::(\d{2}))?(?:[.,](\d{1,3}))?\s*\]|\(\s*(\d{1,2}):(\d{2})(?::(\d{2}))?(?:[.,](\d{1,3}))?\s*\))/;
// Unbracketed only with three fields (`0:01:02`, `00:01:02.5`), so that a time of day such as
// "10:30" opening a sentence is not taken for one.
const BARE = /^(\d{1,2}):(\d{2}):(\d{2})(?:[.,](\d{1,3}))?(?=\s|$)/;
const WHOLE = /^[[(]?\s*(\d{1,2}):(\d{2})(?::(\d{2}))?(?:[.,](\d{1,3}))?\s*[\])]?$/;

/** The timestamp at the start of `s`, bracketed or bare with three fields. */
export function matchStamp(s: string): StampMatch | null {
  const bare = BARE.exec(s);
  if (bare) return toMatch(bare[0], bare.slice(1, 5));
  const m = BRACKETED.exec(s);
  if (!m) return null;
  return toMatch(m[0], m[1] !== undefined ? m.slice(1, 5) : m.slice(5, 9));
}

/** A timestamp (`m:ss` or `h:mm:ss`, bracketed or not) that is the whole of `s`. */
export function matchWholeStamp(s: string): StampMatch | null {
  const t = s.trim();
  const m = WHOLE.exec(t);
  return m ? toMatch(t, m.slice(1, 5)) : null;
}

function toMatch(text: string, [a, b, c, frac]: Array<string | undefined>): StampMatch {
  const ms =
    c === undefined
      ? clockToMs(0, Number(a), Number(b), fractionToMs(frac))
      : clockToMs(Number(a), Number(b), Number(c), fractionToMs(frac));
  return ms === null ? { ok: false, length: text.length, text } : { ok: true, ms, length: text.length };
}
