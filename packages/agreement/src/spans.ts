import { AgreementError, shown } from './errors.js';
import type { Value } from './types.js';

/** A coder's unit on a continuum: half-open [start, end) in integer positions (e.g. character offsets). */
export interface Span {
  coder: string;
  value: Value;
  start: number;
  end: number;
}

export interface Continuum {
  start: number;
  end: number;
}

/** A piece of one coder's partition of the continuum; `value` -1 marks a gap. */
export interface Section {
  start: number;
  end: number;
  value: number;
}

export function checkContinuum(c: Continuum): void {
  if (!c || typeof c !== 'object' || !Number.isSafeInteger(c.start) || !Number.isSafeInteger(c.end) || c.end <= c.start)
    throw new AgreementError('invalid-input', 'continuum needs integer start < end');
}

export function checkSpan(s: Span, c: Continuum): void {
  if (!s || typeof s.coder !== 'string' || (typeof s.value !== 'string' && typeof s.value !== 'number'))
    throw new AgreementError('invalid-input', 'each span needs a coder (string), a value, a start and an end');
  if (!Number.isSafeInteger(s.start) || !Number.isSafeInteger(s.end) || s.end <= s.start)
    throw new AgreementError('invalid-value', `span of ${s.coder} needs integer start < end, got [${shown(s.start)}, ${shown(s.end)})`);
  if (s.start < c.start || s.end > c.end)
    throw new AgreementError('span-outside-continuum', `span [${s.start}, ${s.end}) of ${s.coder} lies outside [${c.start}, ${c.end})`);
}

/**
 * One coder's partition: the given spans (sorted, not overlapping) with the gaps between them filled
 * in as sections of value -1. Touching spans are fine; overlapping ones are refused.
 */
export function partition(spans: ReadonlyArray<{ start: number; end: number; value: number }>, c: Continuum, who: string): Section[] {
  const sorted = [...spans].sort((a, b) => a.start - b.start || a.end - b.end);
  const out: Section[] = [];
  let pos = c.start;
  for (const s of sorted) {
    if (s.start < pos)
      throw new AgreementError('overlapping-units', `${who} has overlapping units at [${s.start}, ${s.end}); unitizing needs them disjoint`);
    if (s.start > pos) out.push({ start: pos, end: s.start, value: -1 });
    out.push({ start: s.start, end: s.end, value: s.value });
    pos = s.end;
  }
  if (pos < c.end) out.push({ start: pos, end: c.end, value: -1 });
  return out;
}

/** Calls `visit` for every pair of overlapping sections of two partitions of the same continuum. */
export function sweep(a: ReadonlyArray<Section>, b: ReadonlyArray<Section>, visit: (x: Section, y: Section, overlap: number) => void): void {
  let i = 0;
  let j = 0;
  while (i < a.length && j < b.length) {
    const x = a[i]!;
    const y = b[j]!;
    const overlap = Math.min(x.end, y.end) - Math.max(x.start, y.start);
    if (overlap > 0) visit(x, y, overlap);
    if (x.end <= y.end) i++;
    if (y.end <= x.end) j++;
  }
}

/** Coder names in order of first appearance, unless the caller lists them (coders with no spans count too). */
export function coderList(spans: ReadonlyArray<Span>, coders?: ReadonlyArray<string>): string[] {
  if (coders) {
    const known = new Set(coders);
    for (const s of spans) if (!known.has(s.coder)) throw new AgreementError('invalid-input', `span by unknown coder ${s.coder}`);
    return [...coders];
  }
  return [...new Set(spans.map((s) => s.coder))];
}
