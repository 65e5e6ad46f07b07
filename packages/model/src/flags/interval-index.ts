import type { FlagSegment } from './types.js';

const covers = (s: FlagSegment) => !s.orphaned && !s.unresolved && s.end > s.start;

/**
 * Segments sorted by start, with the longest length, so an overlap query scans only the starts in
 * (s - maxLen, e). Orphaned and unresolved segments cover no text and are left out.
 * Positions are updated in place by the engine; `reorder` restores the order afterwards (offsets move
 * monotonically under an edit, so the array is nearly sorted and the sort is close to linear).
 */
export class IntervalIndex {
  private items: FlagSegment[] = [];
  private maxLen = 0;

  static build(segments: Iterable<FlagSegment>): IntervalIndex {
    const idx = new IntervalIndex();
    for (const s of segments) if (covers(s)) idx.items.push(s);
    idx.reorder();
    return idx;
  }

  get size(): number {
    return this.items.length;
  }

  /** After positions changed in place: drop what no longer covers text, add what does again, re-sort. */
  reorder(extra: Iterable<FlagSegment> = []): void {
    const kept = this.items.filter(covers);
    const present = new Set(kept);
    for (const s of extra) if (covers(s) && !present.has(s)) kept.push(s);
    kept.sort((a, b) => a.start - b.start);
    this.items = kept;
    let m = 0;
    for (const s of kept) if (s.end - s.start > m) m = s.end - s.start;
    this.maxLen = m;
  }

  private lowerBound(start: number): number {
    let lo = 0;
    let hi = this.items.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.items[mid]!.start < start) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  /** A segment grew in place without changing the order (an insertion inside it). */
  noteWidth(width: number): void {
    if (width > this.maxLen) this.maxLen = width;
  }

  add(s: FlagSegment): void {
    if (!covers(s)) return;
    this.items.splice(this.lowerBound(s.start), 0, s);
    if (s.end - s.start > this.maxLen) this.maxLen = s.end - s.start;
  }

  /** Remove by identity; `s` must still hold the position it was indexed at. */
  remove(s: FlagSegment): void {
    for (let i = this.lowerBound(s.start); i < this.items.length && this.items[i]!.start === s.start; i++) {
      if (this.items[i] === s) {
        this.items.splice(i, 1);
        return;
      }
    }
    const i = this.items.indexOf(s); // not where expected (should not happen): fall back to a scan
    if (i >= 0) this.items.splice(i, 1);
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
