// Places of a walk-through: where coders' sets of codes differ. Turn-level comparison as in the
// unit-based agreement data (each coder's set of codes per unit; common practice).
import { describe, expect, it } from 'vitest';
import { disagreementPlaces } from './places.js';

const turns = [{ start: 0, end: 20 }, { start: 21, end: 40 }, { start: 41, end: 60 }];

describe('disagreement places', () => {
  it('lists the turns where the coders applied different codes, with each coder side by side', () => {
    const segs = [
      { id: 'a1', coderId: 'a', codeId: 'x', start: 2, end: 10 },
      { id: 'b1', coderId: 'b', codeId: 'x', start: 0, end: 20 },
      { id: 'a2', coderId: 'a', codeId: 'x', start: 22, end: 30 },
      { id: 'b2', coderId: 'b', codeId: 'y', start: 22, end: 30 },
      { id: 'a3', coderId: 'a', codeId: 'x', start: 45, end: 50 },
    ];
    expect(disagreementPlaces(segs, ['a', 'b'], turns)).toEqual([
      { start: 21, end: 40, byCoder: [{ coderId: 'a', codeIds: ['x'], segmentIds: ['a2'] }, { coderId: 'b', codeIds: ['y'], segmentIds: ['b2'] }] },
      { start: 41, end: 60, byCoder: [{ coderId: 'a', codeIds: ['x'], segmentIds: ['a3'] }, { coderId: 'b', codeIds: [], segmentIds: [] }] },
    ]);
  });

  it('without turns, joins overlapping segments into runs and keeps the runs coded differently', () => {
    const segs = [
      { id: 'a1', coderId: 'a', codeId: 'x', start: 0, end: 10 },
      { id: 'b1', coderId: 'b', codeId: 'x', start: 5, end: 12 },
      { id: 'a2', coderId: 'a', codeId: 'x', start: 20, end: 30 },
      { id: 'b2', coderId: 'b', codeId: 'y', start: 25, end: 35 },
      { id: 'c1', coderId: 'c', codeId: 'z', start: 50, end: 60 },
    ];
    const places = disagreementPlaces(segs, ['a', 'b'], undefined);
    expect(places.map((p) => [p.start, p.end])).toEqual([[20, 35]]);
  });

  it('ignores coders not in the round and collapsed segments', () => {
    const segs = [
      { id: 'a1', coderId: 'a', codeId: 'x', start: 0, end: 10 },
      { id: 'b1', coderId: 'b', codeId: 'x', start: 0, end: 10 },
      { id: 'z1', coderId: 'z', codeId: 'y', start: 0, end: 10 },
      { id: 'b2', coderId: 'b', codeId: 'y', start: 4, end: 4 },
    ];
    expect(disagreementPlaces(segs, ['a', 'b'], turns)).toEqual([]);
  });
});
