import type { CodedText } from './coded-text.js';

/**
 * Presence patterns of one code on one text: for each unit (fixed unit, or run of characters), the
 * bitmask of coders who applied the code, with a weight (1 per fixed unit, run length per character run).
 * Everything binary in the report (alpha, percent agreement, pair tables) derives from these.
 */
export interface PatternTally {
  masks: number[];
  weights: number[];
}

/** Patterns per code for fixed units. `bit` maps coder id to its bit; codes absent get all-zero patterns. */
export function fixedUnitPatterns(text: CodedText, codeIndex: Map<string, number>, bit: Map<string, number>, codes: number): Int32Array[] {
  const units = [...(text.units ?? [])].map((u, i) => ({ ...u, i })).sort((a, b) => a.start - b.start);
  const U = units.length;
  const masks: Int32Array[] = Array.from({ length: codes }, () => new Int32Array(U));
  // Units sorted by start. Disjoint units (the usual turns or paragraphs) allow a binary search for the
  // first unit a segment can touch; overlapping units fall back to scanning from the first unit.
  let disjoint = true;
  for (let j = 1; j < U; j++) if (units[j]!.start < units[j - 1]!.end) disjoint = false;
  for (const s of text.segments) {
    const c = codeIndex.get(s.codeId);
    const b = bit.get(s.coderId);
    if (c === undefined || b === undefined) continue;
    const row = masks[c]!;
    for (let j = disjoint ? firstEndingAfter(units, s.start) : 0; j < U && units[j]!.start < s.end; j++)
      if (units[j]!.end > s.start) row[units[j]!.i] = row[units[j]!.i]! | b;
  }
  return masks;
}

/** First of the sorted, disjoint units whose end lies after `pos`. */
function firstEndingAfter(units: ReadonlyArray<{ start: number; end: number }>, pos: number): number {
  let lo = 0;
  let hi = units.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (units[mid]!.end <= pos) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Patterns per code at character level, as weighted runs (weight = run length), including the uncoded rest. */
export function characterPatterns(text: CodedText, codeIndex: Map<string, number>, bit: Map<string, number>, codes: number, coderCount: number): PatternTally[] {
  const events: Array<Array<[number, number, number]>> = Array.from({ length: codes }, () => []); // [pos, coderIdx, +1|-1]
  for (const s of text.segments) {
    const c = codeIndex.get(s.codeId);
    const b = bit.get(s.coderId);
    if (c === undefined || b === undefined) continue;
    const idx = 31 - Math.clz32(b);
    events[c]!.push([s.start, idx, 1], [s.end, idx, -1]);
  }
  const depth = new Int32Array(coderCount);
  return events.map((ev) => {
    const out: PatternTally = { masks: [], weights: [] };
    ev.sort((a, b) => a[0] - b[0]);
    depth.fill(0);
    let mask = 0;
    let pos = 0;
    let i = 0;
    while (i < ev.length) {
      const at = ev[i]![0];
      if (at > pos) {
        out.masks.push(mask);
        out.weights.push(at - pos);
        pos = at;
      }
      while (i < ev.length && ev[i]![0] === at) {
        const [, who, d] = ev[i]!;
        depth[who] = depth[who]! + d;
        if (depth[who]! > 0) mask |= 1 << who;
        else mask &= ~(1 << who);
        i++;
      }
    }
    if (text.textLength > pos) {
      out.masks.push(mask);
      out.weights.push(text.textLength - pos);
    }
    return out;
  });
}

export function popcount(x: number): number {
  x = x - ((x >>> 1) & 0x55555555);
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333);
  return (((x + (x >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24;
}

/** Adds the binary coincidences (o00, o01, o11; o10 = o01) of one pattern to `acc` at `at`. */
export function addPattern(acc: Float64Array, at: number, mask: number, coderMask: number, m: number, w: number): void {
  const p = popcount(mask & coderMask);
  const q = m - p;
  const f = w / (m - 1);
  acc[at] = acc[at]! + f * q * (q - 1);
  acc[at + 1] = acc[at + 1]! + f * p * q;
  acc[at + 2] = acc[at + 2]! + f * p * (p - 1);
}

/** Binary alpha and percent agreement from (o00, o01, o11). */
export function binaryFromTriple(o00: number, o01: number, o11: number) {
  const n0 = o00 + o01;
  const n1 = o11 + o01;
  const n = n0 + n1;
  if (n < 2) return { value: null, reason: 'no-pairable-values' as const, D_o: null, D_e: null, percentAgreement: null, n };
  const D_o = (2 * o01) / n;
  const D_e = (2 * n0 * n1) / (n * (n - 1));
  const percentAgreement = (o00 + o11) / n;
  if (D_e === 0) return { value: null, reason: 'no-variation' as const, D_o, D_e, percentAgreement, n };
  return { value: 1 - D_o / D_e, D_o, D_e, percentAgreement, n };
}
