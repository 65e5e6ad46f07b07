// Margin layout: fractions and lanes checked against hand-worked cases (common practice; no outside source applies).
import { describe, expect, it } from 'vitest';
import { assignColumns, layoutBars, mergeLanes, sameBars, type MarginSegment } from './margin.js';

const turns = [
  { start: 0, end: 10 },
  { start: 11, end: 31 },
  { start: 32, end: 40 },
];
const seg = (id: string, layer: string, start: number, end: number): MarginSegment => ({ id, layer, codeId: 'k', start, end, orphaned: start === end });

describe('layoutBars', () => {
  it('places a segment inside one turn at its character fractions', () => {
    const bars = layoutBars(turns, [seg('a', 'L1', 16, 21)], ['L1']);
    expect(bars[0]).toEqual([]);
    expect(bars[1]).toHaveLength(1);
    expect(bars[1]![0]).toMatchObject({ id: 'a', lane: 0, top: 0.25, bottom: 0.5, opens: true, closes: true });
    expect(bars[2]).toEqual([]);
  });

  it('splits a segment that crosses turns into one bar per turn, capped only at its ends', () => {
    const bars = layoutBars(turns, [seg('a', 'L2', 5, 35)], ['L1', 'L2']);
    expect(bars.map((b) => b.length)).toEqual([1, 1, 1]);
    expect(bars[0]![0]).toMatchObject({ lane: 1, top: 0.5, bottom: 1, opens: true, closes: false });
    expect(bars[1]![0]).toMatchObject({ top: 0, bottom: 1, opens: false, closes: false });
    expect(bars[2]![0]).toMatchObject({ top: 0, bottom: 3 / 8, opens: false, closes: true });
  });

  it('leaves out layers that are hidden and keeps an orphaned segment as a point', () => {
    const bars = layoutBars(turns, [seg('a', 'hidden', 0, 5), seg('o', 'L1', 20, 20)], ['L1']);
    expect(bars.flat().map((b) => b.id)).toEqual(['o']);
    expect(bars[1]![0]).toMatchObject({ orphaned: true, top: 0.45, bottom: 0.45 });
  });
});

describe('assignColumns', () => {
  it('puts overlapping segments of one layer side by side and reuses freed columns', () => {
    const cols = assignColumns([seg('a', 'L', 0, 10), seg('b', 'L', 5, 15), seg('c', 'L', 12, 20), seg('x', 'M', 0, 10)]);
    expect(cols.get('a')).toBe(0);
    expect(cols.get('b')).toBe(1);
    expect(cols.get('c')).toBe(0);
    expect(cols.get('x')).toBe(0);
  });
});

describe('sameBars', () => {
  it('is true for equal layouts and false when one bar moves', () => {
    const a = layoutBars(turns, [seg('a', 'L1', 16, 21)], ['L1']);
    const b = layoutBars(turns, [seg('a', 'L1', 16, 21)], ['L1']);
    const c = layoutBars(turns, [seg('a', 'L1', 17, 21)], ['L1']);
    expect(sameBars(a[1]!, b[1]!)).toBe(true);
    expect(sameBars(a[1]!, c[1]!)).toBe(false);
  });
});

describe('mergeLanes', () => {
  it('gives the same bars as laying out every layer at once, and keeps the objects of a layer in its own lane', () => {
    const segs = [seg('a', 'L1', 2, 8), seg('b', 'L2', 5, 35), seg('c', 'L1', 4, 20), seg('d', 'L3', 12, 14)];
    const lanes = ['L1', 'L2', 'L3'];
    const alone = new Map(lanes.map((l) => [l, layoutBars(turns, segs.filter((s) => s.layer === l), [l])]));
    const merged = mergeLanes(turns.length, lanes, alone);
    const together = layoutBars(turns, segs, lanes);
    const key = (rows: typeof merged) => rows.map((r) => r.map((b) => `${b.id}:${b.lane}:${b.column}:${b.top}:${b.bottom}`).sort());
    expect(key(merged)).toEqual(key(together));
    expect(merged[0]!.find((b) => b.id === 'a')).toBe(alone.get('L1')![0]!.find((b) => b.id === 'a'));
  });

  it('keeps the objects of every layer laid out at its own lane (firstLane)', () => {
    const segs = [seg('a', 'L1', 2, 8), seg('b', 'L2', 5, 35), seg('d', 'L3', 12, 14)];
    const lanes = ['L1', 'L2', 'L3'];
    const alone = new Map(lanes.map((l, i) => [l, layoutBars(turns, segs.filter((s) => s.layer === l), [l], i)]));
    const merged = mergeLanes(turns.length, lanes, alone);
    for (const l of lanes) for (const [t, row] of alone.get(l)!.entries()) for (const b of row) expect(merged[t]).toContain(b);
    expect(merged[1]!.find((b) => b.id === 'b')).toMatchObject({ lane: 1 });
    expect(merged[1]!.find((b) => b.id === 'd')).toMatchObject({ lane: 2 });
  });

  it('renumbers lanes when a layer is hidden and leaves hidden layers out', () => {
    const alone = new Map([['L1', layoutBars(turns, [seg('a', 'L1', 0, 5)], ['L1'])], ['L2', layoutBars(turns, [seg('b', 'L2', 0, 5)], ['L2'])]]);
    const merged = mergeLanes(turns.length, ['L2'], alone);
    expect(merged[0]).toHaveLength(1);
    expect(merged[0]![0]).toMatchObject({ id: 'b', lane: 0 });
  });
});
