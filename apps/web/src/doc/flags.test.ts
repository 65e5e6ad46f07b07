// Flags on one text, against the rules of DESIGN §4 (the project's own spec) on hand-built cases.
import { describe, expect, it } from 'vitest';
import { computeFlags, type Segment } from './flags.js';

const seg = (id: string, coderId: string, codeId: string, start: number, end: number): Segment => ({
  id, coderId, codeId, start, end, quote: '', orphaned: start === end, unresolved: false, turn: null, createdAt: 0,
});
const codes = [
  { id: 'a', label: 'Belonging', status: 'active' as const },
  { id: 'b', label: 'Isolation', status: 'active' as const },
  { id: 'c', label: 'Old', status: 'retired' as const },
];
const sets = [{ id: 'x', label: 'Social tie', codeIds: ['a', 'b'] }];

describe('computeFlags', () => {
  it('flags two codes of one exclusive set on overlapping words, by anyone', () => {
    const f = computeFlags([seg('1', 'ann', 'a', 0, 10), seg('2', 'bo', 'b', 5, 20)], codes, sets, { showDisagreement: false });
    expect(f.map((x) => x.kind)).toEqual(['exclusive']);
    expect(f[0]).toMatchObject({ start: 5, end: 10, segmentIds: ['1', '2'] });
  });

  it('clears when the overlap is gone', () => {
    expect(computeFlags([seg('1', 'ann', 'a', 0, 10), seg('2', 'bo', 'b', 10, 20)], codes, sets, { showDisagreement: false })).toEqual([]);
  });

  it('flags duplicates, retired codes and orphans', () => {
    const f = computeFlags([seg('1', 'ann', 'a', 0, 10), seg('2', 'ann', 'a', 3, 4), seg('3', 'ann', 'c', 30, 40), seg('4', 'bo', 'a', 50, 50)], codes, sets, { showDisagreement: false });
    expect(f.map((x) => x.kind).sort()).toEqual(['duplicate', 'orphaned', 'retired-code']);
  });

  it('shows disagreement only when asked (not during independent coding)', () => {
    const s = [seg('1', 'ann', 'a', 0, 10), seg('2', 'bo', 'c', 5, 8)];
    expect(computeFlags(s, codes, [], { showDisagreement: false }).map((x) => x.kind)).toEqual(['retired-code']);
    expect(computeFlags(s, codes, [], { showDisagreement: true }).map((x) => x.kind).sort()).toEqual(['disagreement', 'retired-code']);
  });
});
