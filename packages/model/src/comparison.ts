/**
 * One layer against a reference layer, segment by segment: what a supervisor reads when reviewing a
 * trainee's coding. Pure: resolved segments (UTF-16 offsets into one text) in, four lists out.
 *
 * The categories are common practice in supervised coding review (no published source fixes their
 * names or boundaries); they are made disjoint here so every place is counted once:
 * - two segments *overlap* when they share at least one character;
 * - **other boundary**: a reference segment overlapped by a layer segment of the same code whose start
 *   or end lies more than `toleranceWords` words away (the overlapping one sharing the most characters,
 *   then with the nearest boundaries, is the match; a shift across spaces or punctuation only is zero words);
 * - **other code**: a reference segment overlapped by no layer segment of its code but by one or more
 *   of other codes (listed once, here, not again as missed or extra);
 * - **missed**: a reference segment overlapped by no layer segment at all;
 * - **extra**: a layer segment overlapping no reference segment of its code and not already listed
 *   under other code.
 * Segments that collapsed to a point (every character deleted) take no part: they cover no words.
 */

export interface ComparedSegment {
  id: string;
  codeId: string;
  start: number;
  end: number;
}

export interface PlacedSegment extends ComparedSegment {
  quote: string;
}

export interface ComparisonEntry {
  /** The place in the text (UTF-16 offsets): the reference segment, the extra segment, or both for a boundary. */
  start: number;
  end: number;
  quote: string;
  /** The codes involved: the reference's first, then the layer's. */
  codeIds: string[];
  reference: PlacedSegment | null;
  layer: PlacedSegment[];
  /** other boundary only: how many words the layer's start and end lie from the reference's. */
  startShiftWords?: number;
  endShiftWords?: number;
}

export interface CodeCounts {
  matched: number;
  missed: number;
  extra: number;
  otherCode: number;
  otherBoundary: number;
}

export interface Comparison {
  missed: ComparisonEntry[];
  extra: ComparisonEntry[];
  otherCode: ComparisonEntry[];
  otherBoundary: ComparisonEntry[];
  /** Per code: the reference's code for matched, missed, other code and other boundary; the layer's for extra. */
  counts: Record<string, CodeCounts>;
  toleranceWords: number;
}

export class ComparisonInputError extends Error {
  readonly code = 'bad_comparison_input';
}

const WORD = /[\p{L}\p{M}\p{N}]+(?:['’\-][\p{L}\p{M}\p{N}]+)*/gu;

/** Word spans of a text, for counting how many words lie between two positions. */
export function wordSpans(text: string): Int32Array {
  const out: number[] = [];
  for (const m of text.matchAll(WORD)) out.push(m.index, m.index + m[0].length);
  return Int32Array.from(out);
}

/** Number of words with at least one character between positions a and b (in either order). */
export function wordsBetween(words: Int32Array, a: number, b: number): number {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  if (lo === hi) return 0;
  const n = words.length / 2;
  // first word ending after lo
  let l = 0;
  let r = n;
  while (l < r) {
    const m = (l + r) >> 1;
    if (words[2 * m + 1]! > lo) r = m;
    else l = m + 1;
  }
  const first = l;
  // first word starting at or after hi
  l = first;
  r = n;
  while (l < r) {
    const m = (l + r) >> 1;
    if (words[2 * m]! >= hi) r = m;
    else l = m + 1;
  }
  return l - first;
}

const overlaps = (a: ComparedSegment, b: ComparedSegment) => a.start < b.end && b.start < a.end;
const shared = (a: ComparedSegment, b: ComparedSegment) => Math.max(0, Math.min(a.end, b.end) - Math.max(a.start, b.start));
/** Whether t matches r better than best: more characters shared, then boundaries nearer. */
const closer = (r: ComparedSegment, t: ComparedSegment, best: ComparedSegment) => {
  const d = shared(r, t) - shared(r, best);
  if (d !== 0) return d > 0;
  return Math.abs(r.start - t.start) + Math.abs(r.end - t.end) < Math.abs(r.start - best.start) + Math.abs(r.end - best.end);
};
const byPlace = (a: ComparedSegment, b: ComparedSegment) => a.start - b.start || a.end - b.end || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

export function compareLayers(
  text: string,
  layer: readonly ComparedSegment[],
  reference: readonly ComparedSegment[],
  toleranceWords = 0,
): Comparison {
  if (!Number.isInteger(toleranceWords) || toleranceWords < 0) {
    throw new ComparisonInputError('The boundary tolerance is a whole number of words, 0 or more.');
  }
  const valid = (s: ComparedSegment) => {
    if (!Number.isInteger(s.start) || !Number.isInteger(s.end) || s.start < 0 || s.end > text.length || s.end < s.start) {
      throw new ComparisonInputError(`Segment ${String(s.id)} does not lie within the text.`);
    }
    return s.end > s.start;
  };
  const mine = layer.filter(valid).sort(byPlace);
  const refs = reference.filter(valid).sort(byPlace);
  const words = wordSpans(text);
  const ref = (s: ComparedSegment): PlacedSegment => ({ id: s.id, codeId: s.codeId, start: s.start, end: s.end, quote: text.slice(s.start, s.end) });

  const result: Comparison = { missed: [], extra: [], otherCode: [], otherBoundary: [], counts: {}, toleranceWords };
  const count = (codeId: string, key: keyof CodeCounts) => {
    const c = (result.counts[codeId] ??= { matched: 0, missed: 0, extra: 0, otherCode: 0, otherBoundary: 0 });
    c[key]++;
  };
  const listedAsOtherCode = new Set<string>();

  for (const r of refs) {
    const touching = mine.filter((t) => overlaps(r, t));
    const same = touching.filter((t) => t.codeId === r.codeId);
    if (same.length > 0) {
      const match = same.reduce((best, t) => (closer(r, t, best) ? t : best));
      const startShiftWords = wordsBetween(words, r.start, match.start);
      const endShiftWords = wordsBetween(words, r.end, match.end);
      if (Math.max(startShiftWords, endShiftWords) > toleranceWords) {
        const start = Math.min(r.start, match.start);
        const end = Math.max(r.end, match.end);
        result.otherBoundary.push({ start, end, quote: text.slice(start, end), codeIds: [r.codeId], reference: ref(r), layer: [ref(match)], startShiftWords, endShiftWords });
        count(r.codeId, 'otherBoundary');
      } else count(r.codeId, 'matched');
    } else if (touching.length > 0) {
      for (const t of touching) listedAsOtherCode.add(t.id);
      const codeIds = [r.codeId, ...new Set(touching.map((t) => t.codeId))];
      result.otherCode.push({ start: r.start, end: r.end, quote: text.slice(r.start, r.end), codeIds, reference: ref(r), layer: touching.map(ref) });
      count(r.codeId, 'otherCode');
    } else {
      result.missed.push({ start: r.start, end: r.end, quote: text.slice(r.start, r.end), codeIds: [r.codeId], reference: ref(r), layer: [] });
      count(r.codeId, 'missed');
    }
  }
  for (const t of mine) {
    if (listedAsOtherCode.has(t.id)) continue;
    if (refs.some((r) => r.codeId === t.codeId && overlaps(r, t))) continue;
    result.extra.push({ start: t.start, end: t.end, quote: text.slice(t.start, t.end), codeIds: [t.codeId], reference: null, layer: [ref(t)] });
    count(t.codeId, 'extra');
  }
  return result;
}
