import type { FlagSegment } from './types.js';

/**
 * Segments sorted by start, with the longest length, so an overlap query scans only the starts in
 * (s - maxLen, e). Orphaned and unresolved segments cover no text and are left out.
 */
export class IntervalIndex {
  private items: FlagSegment[] = [];
  private maxLen = 0;

  static build(segments: Iterable<FlagSegment>): IntervalIndex {
    const idx = new IntervalIndex();
    for (const s of segments) if (!s.orphaned && !s.unresolved && s.end > s.start) idx.items.push(s);
    // Nearly sorted after a text edit (offsets shift monotonically), which TimSort handles in ~linear time.
    idx.items.sort((a, b) => a.start - b.start);
    for (const s of idx.items) idx.maxLen = Math.max(idx.maxLen, s.end - s.start);
    return idx;
  }

  get size(): number {
    return this.items.length;
  }

  /** Calls `fn` for every indexed segment overlapping [start, end). */
  overlapping(start: number, end: number, fn: (s: FlagSegment) => void): void {
    const items = this.items;
    let lo = 0;
    let hi = items.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (items[mid]!.start < end) lo = mid + 1;
      else hi = mid;
    }
    const floor = start - this.maxLen;
    for (let i = lo - 1; i >= 0; i--) {
      const s = items[i]!;
      if (s.start <= floor) break;
      if (s.end > start) fn(s);
    }
  }
}
