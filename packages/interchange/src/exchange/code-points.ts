/**
 * UTF-16 code units (how JavaScript strings and Gloss count offsets) and Unicode code points (how the
 * REFI-QDA standard counts positions, spec §10.2). They differ for text outside the Basic
 * Multilingual Plane, where one character is a surrogate pair.
 */

/** A converter for one string: both directions in O(log n) after one O(n) pass. */
export class OffsetMap {
  /** UTF-16 offsets at which a surrogate pair starts, ascending. */
  private readonly pairs: number[] = [];
  readonly utf16Length: number;
  readonly codePointLength: number;

  constructor(s: string) {
    for (let i = 0; i < s.length; i++) {
      const c = s.charCodeAt(i);
      if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length) {
        const d = s.charCodeAt(i + 1);
        if (d >= 0xdc00 && d <= 0xdfff) {
          this.pairs.push(i);
          i++;
        }
      }
    }
    this.utf16Length = s.length;
    this.codePointLength = s.length - this.pairs.length;
  }

  /** Code-point index of a UTF-16 offset (an offset inside a pair counts as the pair's start). */
  toCodePoint(utf16: number): number {
    // pairs starting before `utf16` each shrink the count by one
    let lo = 0;
    let hi = this.pairs.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.pairs[mid]! < utf16 - 1) lo = mid + 1;
      else hi = mid;
    }
    // lo = number of pairs starting at or before utf16 - 2 (fully before utf16)
    const inside = lo < this.pairs.length && this.pairs[lo] === utf16 - 1;
    return utf16 - lo - (inside ? 1 : 0);
  }

  /** UTF-16 offset of a code-point index (clamped to the string). */
  toUtf16(codePoint: number): number {
    // the k-th pair (0-based) starts at code point pairs[k] - k
    let lo = 0;
    let hi = this.pairs.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.pairs[mid]! - mid < codePoint) lo = mid + 1;
      else hi = mid;
    }
    return Math.min(this.utf16Length, codePoint + lo);
  }
}
