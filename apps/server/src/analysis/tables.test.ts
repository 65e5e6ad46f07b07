import { describe, expect, it } from 'vitest';
import { caseByCode, codeByAttribute, cooccurrence, cooccurringSegments, type SegmentFact } from './tables.js';

// Hand-computed cases (worked out on paper for this test; common practice for these counts).
const seg = (id: string, textId: string, codeId: string, start: number, end: number, turnIndex: number): SegmentFact => ({ id, textId, codeId, coderId: 'u', start, end, turnIndex });
const S: SegmentFact[] = [
  seg('1', 'T1', 'A', 0, 10, 0),
  seg('2', 'T1', 'B', 5, 15, 0), // overlaps 1 (A)
  seg('3', 'T1', 'C', 10, 20, 1), // touches 1 at 10 (no shared character), overlaps 2 (B)
  seg('4', 'T1', 'A', 30, 40, 2),
  seg('5', 'T2', 'A', 0, 5, 0),
  seg('6', 'T2', 'B', 100, 120, 0), // same turn as 5, no overlap
];

describe('co-occurrence', () => {
  it('by overlap: pairs sharing at least one character; diagonal = segments of the code', () => {
    const m = cooccurrence(S, ['A', 'B', 'C'], 'overlap');
    // A–B: (1,2) = 1. B–C: (2,3) = 1. A–C: (1,3) touch only = 0. Diagonal: A 3, B 2, C 1.
    expect(m.cells).toEqual([
      [3, 1, 0],
      [1, 2, 1],
      [0, 1, 1],
    ]);
  });
  it('by unit (speaker turn): turns holding both codes', () => {
    const m = cooccurrence(S, ['A', 'B', 'C'], 'unit');
    // turns: T1#0 {A,B}, T1#1 {C}, T1#2 {A}, T2#0 {A,B} → A–B 2, A 3, B 2, C 1, others 0
    expect(m.cells).toEqual([
      [3, 2, 0],
      [2, 2, 0],
      [0, 0, 1],
    ]);
  });
  it('drill-down gives the segments behind a cell', () => {
    expect([...cooccurringSegments(S, 'A', 'B', 'overlap')]).toEqual(['1']);
    expect([...cooccurringSegments(S, 'A', 'B', 'unit')].sort()).toEqual(['1', '5']);
  });
});

describe('code by attribute and case by code', () => {
  const cases = [
    { id: 'p1', textIds: ['T1'], values: { port: 'North' } },
    { id: 'p2', textIds: ['T2'], values: { port: 'South' } },
    { id: 'p3', textIds: ['T1'], values: { port: 'South' } }, // a joint interview: T1 belongs to p1 and p3
    { id: 'p4', textIds: [], values: {} },
  ];
  it('counts cases by default: A appears for p1 (North), p2 and p3 (South); no-value column has p4 only', () => {
    const m = codeByAttribute(S, cases, ['A', 'B', 'C'], 'port', ['North', 'South', ''], 'cases');
    expect(m.cells).toEqual([
      [1, 2, 0],
      [1, 2, 0],
      [1, 1, 0],
    ]);
    expect(m.casesPerValue).toEqual([1, 2, 1]);
  });
  it('counts segments on request (a segment of a shared text counts once per value)', () => {
    const m = codeByAttribute(S, cases, ['A', 'B', 'C'], 'port', ['North', 'South', ''], 'segments');
    // A: T1 segs 1,4 → North 2, South 2 (via p3); T2 seg 5 → South +1 = 3
    expect(m.cells[0]).toEqual([2, 3, 0]);
    expect(m.cells[2]).toEqual([1, 1, 0]);
  });
  it('case by code counts segments in the case’s texts', () => {
    const m = caseByCode(S, cases, ['A', 'B', 'C']);
    expect(m.rows).toEqual(['p1', 'p2', 'p3', 'p4']);
    expect(m.cells).toEqual([
      [2, 1, 1],
      [1, 1, 0],
      [2, 1, 1],
      [0, 0, 0],
    ]);
  });
});
