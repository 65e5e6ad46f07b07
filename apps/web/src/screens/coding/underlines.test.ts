import { describe, expect, it } from 'vitest';
import { MAX_DEPTH, stackDepths, stripsFor } from './underlines.js';

// Interval partitioning by a greedy sweep in start order uses as many depths as the largest number of
// parts overlapping at one point (the classic interval-colouring result; common practice).
describe('stackDepths', () => {
  it('gives overlapping parts different depths and reuses a depth once the earlier part has ended', () => {
    const d = stackDepths([{ id: 'a', from: 0, to: 10 }, { id: 'b', from: 5, to: 15 }, { id: 'c', from: 12, to: 20 }]);
    expect(d.get('a')).toBe(0);
    expect(d.get('b')).toBe(1);
    expect(d.get('c')).toBe(0);
  });

  it('never gives two overlapping parts one depth while depths remain (random cases)', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    for (let run = 0; run < 300; run++) {
      const parts = Array.from({ length: 1 + Math.floor(rnd() * 6) }, (_, i) => {
        const from = Math.floor(rnd() * 50);
        return { id: `p${i}`, from, to: from + 1 + Math.floor(rnd() * 20) };
      });
      const d = stackDepths(parts);
      const maxOverlap = Math.max(...parts.map((p) => parts.filter((q) => q.from <= p.from && q.to > p.from).length));
      if (maxOverlap > MAX_DEPTH) continue;
      for (const p of parts) for (const q of parts) {
        if (p !== q && p.from < q.to && q.from < p.to) expect(d.get(p.id)).not.toBe(d.get(q.id));
      }
      expect(Math.max(...d.values()) + 1).toBe(maxOverlap);
    }
  });
});

describe('stripsFor', () => {
  it('puts one strip under each line box, deeper strips lower', () => {
    const rects = [{ left: 110, right: 300, bottom: 140 }, { left: 100, right: 160, bottom: 170 }];
    expect(stripsFor(rects, { left: 100, top: 100 }, 0)).toEqual([{ left: 10, top: 41, width: 190 }, { left: 0, top: 71, width: 60 }]);
    expect(stripsFor(rects, { left: 100, top: 100 }, 2)[0]!.top).toBe(51);
  });
});
