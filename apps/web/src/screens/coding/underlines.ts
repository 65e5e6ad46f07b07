/**
 * Underlines under coded words (pure): overlapping segments in one turn get different depths, so their
 * lines stack below the words instead of covering each other. Depths are shared by all visible layers
 * of the turn (two coders' segments on the same words stack too).
 */
export interface Part { id: string; from: number; to: number }

/** How many lines can stack under one line of words (the line height leaves room for this many). */
export const MAX_DEPTH = 4;

/** A greedy sweep: each part takes the shallowest depth free over its span; deeper overlaps share the last. */
export function stackDepths(parts: readonly Part[]): Map<string, number> {
  const sorted = [...parts].sort((a, b) => a.from - b.from || b.to - a.to || (a.id < b.id ? -1 : 1));
  const ends: number[] = [];
  const out = new Map<string, number>();
  for (const p of sorted) {
    if (out.has(p.id)) continue;
    let d = ends.findIndex((e) => e <= p.from);
    if (d < 0) d = ends.length < MAX_DEPTH ? ends.push(0) - 1 : MAX_DEPTH - 1;
    ends[d] = Math.max(ends[d] ?? 0, p.to);
    out.set(p.id, d);
  }
  return out;
}

export interface Strip { left: number; top: number; width: number }

/** One strip per line box of a segment's words (client rects relative to `base`), just under the line. */
export function stripsFor(rects: ReadonlyArray<{ left: number; right: number; bottom: number }>, base: { left: number; top: number }, depth: number): Strip[] {
  const out: Strip[] = [];
  for (const r of rects) {
    const width = r.right - r.left;
    if (width < 1) continue;
    out.push({ left: r.left - base.left, top: r.bottom - base.top + 1 + depth * 5, width });
  }
  return out;
}
