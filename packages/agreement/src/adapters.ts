import { checkCodedText, mergeOverlapping, type CodedText } from './coded-text.js';
import { AgreementError } from './errors.js';
import type { Span } from './spans.js';

/**
 * Pure adapters from Gloss coding to reliability data. Segments are half-open character offsets.
 * Rules (documented here, relied on by the report):
 * - fixed units: a coder applied a code to a unit when one of their segments with that code shares at
 *   least one character with the unit (any overlap);
 * - character level: every character of the text is a unit; present = inside one of the coder's
 *   segments with that code;
 * - unitizing: a coder's overlapping segments of one code are merged into one unit.
 */

function codersOf(text: CodedText, coders?: ReadonlyArray<string>): string[] {
  const list = text.coders ?? coders ?? [...new Set(text.segments.map((s) => s.coderId))];
  return [...list];
}

/** Presence (1) / absence (0) of `codeId` per coder (rows) and fixed unit (columns). */
export function fixedUnitData(text: CodedText, codeId: string, coders?: ReadonlyArray<string>): number[][] {
  checkCodedText(text);
  if (!text.units) throw new AgreementError('invalid-input', `text ${text.textId} has no units`);
  const units = text.units;
  return codersOf(text, coders).map((coder) => {
    const own = text.segments.filter((s) => s.coderId === coder && s.codeId === codeId);
    return units.map((u) => (own.some((s) => s.start < u.end && u.start < s.end) ? 1 : 0));
  });
}

/** Presence / absence of `codeId` per coder and character: textLength columns. For short texts and checks. */
export function characterData(text: CodedText, codeId: string, coders?: ReadonlyArray<string>): number[][] {
  checkCodedText(text);
  return codersOf(text, coders).map((coder) => {
    const row = new Array<number>(text.textLength).fill(0);
    for (const s of text.segments) if (s.coderId === coder && s.codeId === codeId) row.fill(1, s.start, s.end);
    return row;
  });
}

/** Spans for unitizing alpha (1995/2004, per category): each coder's segments of each code (or of `codeIds`), overlaps merged. */
export function unitizingSpans(text: CodedText, codeIds?: ReadonlyArray<string>): Span[] {
  checkCodedText(text);
  const wanted = codeIds ? new Set(codeIds) : null;
  const groups = new Map<string, Array<{ start: number; end: number }>>();
  for (const s of text.segments) {
    if (wanted && !wanted.has(s.codeId)) continue;
    const key = JSON.stringify([s.coderId, s.codeId]);
    let g = groups.get(key);
    if (!g) groups.set(key, (g = []));
    g.push(s);
  }
  const out: Span[] = [];
  for (const [key, ranges] of groups) {
    const [coder, value] = JSON.parse(key) as [string, string];
    for (const r of mergeOverlapping(ranges)) out.push({ coder, value, start: r.start, end: r.end });
  }
  return out;
}

/**
 * Spans for the 2016 family: each coder's segments of the given codes (a mutually exclusive set, or a
 * single code). The caller's codes must not overlap within one coder; the unitizing function refuses
 * overlaps and fills the gaps as segments of their own.
 */
export function partitionSpans(text: CodedText, codeIds: ReadonlyArray<string>): Span[] {
  return unitizingSpans(text, codeIds);
}
