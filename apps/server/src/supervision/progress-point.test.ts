// What one progress point says (issue 9 item 6): drift against the trainee's previous value, and a
// reflexive study's point with the comparison counts but no coefficient. The counts come from the real
// comparison (packages/model comparison.ts) on a hand-built text; definitions: common practice in
// supervised coding review, as written there.
import { compareLayers } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import { isDrift, NO_REFERENCE, pointValue, REFLEXIVE, sumCounts } from './progress-point.js';

const pts = (...values: Array<number | null>) => values.map((value) => ({ value }));

describe('drift flag', () => {
  it('is raised when the value fell by more than the threshold since the previous round', () => {
    expect(isDrift(pts(0.8), 0.6, 0.1)).toBe(true); // fell 0.2 > 0.1
    expect(isDrift(pts(0.8), 0.75, 0.1)).toBe(false); // fell 0.05
    expect(isDrift(pts(0.6), 0.9, 0.1)).toBe(false); // rose
  });

  it('compares with the latest earlier value only, not the best one', () => {
    expect(isDrift(pts(0.9, 0.5), 0.45, 0.1)).toBe(false); // 0.5 → 0.45: no drift, though 0.9 → 0.45 is a fall
    expect(isDrift(pts(0.5, 0.9), 0.7, 0.1)).toBe(true);
  });

  it('steps over earlier points without a value, and a fall of exactly the threshold is not drift', () => {
    expect(isDrift(pts(0.8, null), 0.6, 0.1)).toBe(true);
    expect(isDrift(pts(0.75), 0.5, 0.25)).toBe(false); // exactly 0.25 (both exact in binary)
  });

  it('is never raised on a first point or a point without a value', () => {
    expect(isDrift([], 0.1, 0.1)).toBe(false);
    expect(isDrift(pts(null), 0.1, 0.1)).toBe(false);
    expect(isDrift(pts(0.9), null, 0.1)).toBe(false);
  });

  it('with threshold 0 flags any fall', () => {
    expect(isDrift(pts(0.5), 0.49, 0)).toBe(true);
    expect(isDrift(pts(0.5), 0.5, 0)).toBe(false);
  });
});

describe('reflexive-mode progress', () => {
  // "one two three four five six seven eight": offsets of each word.
  const TEXT = 'one two three four five six seven eight';
  const at = (w: string) => TEXT.indexOf(w);
  const seg = (id: string, codeId: string, from: string, to: string) => ({ id, codeId, start: at(from), end: at(to) + to.length });
  const reference = [seg('r1', 'A', 'one', 'two'), seg('r2', 'B', 'four', 'five'), seg('r3', 'C', 'seven', 'eight')];
  const trainee = [seg('t1', 'A', 'one', 'two'), seg('t2', 'D', 'four', 'five'), seg('t3', 'E', 'six', 'six')];
  // By the definitions: A matched; B covered by D only (other code); C untouched (missed); E at "six"
  // overlaps nothing (extra).
  const cmp = compareLayers(TEXT, trainee, reference, 0);

  it('keeps the category counts, summed over the round’s texts', () => {
    expect(sumCounts([cmp])).toEqual({ matched: 1, missed: 1, extra: 1, otherCode: 1, otherBoundary: 0 });
    expect(sumCounts([cmp, cmp])).toEqual({ matched: 2, missed: 2, extra: 2, otherCode: 2, otherBoundary: 0 });
    expect(sumCounts([])).toEqual({ matched: 0, missed: 0, extra: 0, otherCode: 0, otherBoundary: 0 });
  });

  it('computes no coefficient and says why', async () => {
    let asked = 0;
    const compute = async () => ((asked += 1), { value: 0.9 });
    expect(await pointValue({ reflexive: true, texts: 1, compute })).toEqual({ value: null, note: REFLEXIVE });
    expect(asked).toBe(0); // the statistic is never run in a reflexive study
    // The same point in a standard study carries the coefficient.
    expect(await pointValue({ reflexive: false, texts: 1, compute })).toEqual({ value: 0.9 });
    expect(asked).toBe(1);
  });

  it('without a reference has nothing to compare, in either mode; a statistic that cannot be computed says why', async () => {
    const compute = async () => ({ value: 0.5 });
    expect(await pointValue({ reflexive: true, texts: 0, compute })).toEqual({ value: null, note: NO_REFERENCE });
    expect(await pointValue({ reflexive: false, texts: 0, compute })).toEqual({ value: null, note: NO_REFERENCE });
    expect(await pointValue({ reflexive: false, texts: 1, compute: async () => ({ value: null, reason: 'No variation.' }) })).toEqual({ value: null, note: 'No variation.' });
  });
});
