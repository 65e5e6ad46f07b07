import { describe, expect, it } from 'vitest';
import type { Span } from './spans.js';
import { unitizingAlpha1995 } from './unitizing-1995.js';

// Krippendorff (2004) Content Analysis 2nd ed. p.254 (as in DKPro unitizing/Krippendorff2004Test):
// (begin, length, coder, category) on the continuum [150, 450).
const k2004: Span[] = (
  [
    [225, 70, 0, 'c'], [370, 30, 0, 'c'], [220, 80, 1, 'c'], [355, 20, 1, 'c'], [400, 20, 1, 'c'],
    [180, 60, 0, 'k'], [300, 50, 0, 'k'], [180, 60, 1, 'k'], [300, 50, 1, 'k'],
  ] as const
).map(([b, l, coder, value]) => ({ coder: String(coder), value, start: b, end: b + l }));

// Krippendorff (1995) Sociological Methodology 25:47-76, p.57, pairs A-D on 24 positions (DKPro Krippendorff1995Test).
const k1995: Record<string, Array<[number, number, number]>> = {
  A: [[2, 8, 0], [14, 6, 0], [4, 4, 1], [15, 2, 1]],
  B: [[0, 18, 0], [0, 2, 1], [2, 1, 1], [3, 1, 1], [4, 1, 1], [5, 1, 1], [6, 3, 1], [9, 1, 1]],
  C: [[2, 6, 0], [10, 2, 0], [14, 4, 0], [20, 2, 0], [0, 2, 1], [4, 4, 1], [10, 4, 1], [16, 2, 1], [20, 2, 1]],
  D: [[0, 2, 0], [2, 8, 0], [10, 4, 0], [14, 6, 0], [20, 4, 0], [0, 4, 1], [4, 4, 1], [8, 7, 1], [15, 2, 1], [17, 7, 1]],
};
const pair = (name: string, scale: number): Span[] =>
  k1995[name]!.map(([b, l, coder]) => ({ coder: String(coder), value: name, start: b * scale, end: (b + l) * scale }));

describe('unitizingAlpha1995', () => {
  it('UA-1 Krippendorff (2004) p.254: c D_o .0144 D_e .0532 alpha .7286; k D_o 0 D_e .0490 alpha 1; overall .8591 (exact .8587, tolerance 5e-4)', () => {
    const r = unitizingAlpha1995(k2004, { start: 150, end: 450 });
    const c = r.perCategory.find((x) => x.category === 'c')!;
    const k = r.perCategory.find((x) => x.category === 'k')!;
    expect(c.D_o).toBeCloseTo(0.0144, 4);
    expect(c.D_e).toBeCloseTo(0.0532, 4);
    expect(c.value).toBeCloseTo(0.7286, 4);
    expect(k.D_o).toBe(0);
    expect(k.D_e).toBeCloseTo(0.049, 4);
    expect(k.value).toBe(1);
    expect(Math.abs(r.value! - 0.8591)).toBeLessThan(5e-4);
  });
  it('UA-2 Krippendorff (1995) p.57: D_o A .03125 B 2.26736 C .02777 D .38715 (exact at any resolution)', () => {
    const want: Record<string, number> = { A: 0.03125, B: 2.26736, C: 0.02777, D: 0.38715 };
    for (const name of Object.keys(want)) {
      // the published figures are truncated at 5 decimals (C = 1/36 = .027777...), hence 1e-5
      expect(Math.abs(unitizingAlpha1995(pair(name, 1), { start: 0, end: 24 }).D_o! - want[name]!)).toBeLessThan(1e-5);
      expect(Math.abs(unitizingAlpha1995(pair(name, 50000), { start: 0, end: 24 * 50000 }).D_o! - want[name]!)).toBeLessThan(1e-5);
    }
  });
  it('UA-2 alpha at resolution 50000 (as DKPro scales): A .553 B -.926 C .679 D .066, within +-.02 (paper values approximate)', () => {
    const want: Record<string, number> = { A: 0.553, B: -0.926, C: 0.679, D: 0.066 };
    for (const name of Object.keys(want)) {
      const r = unitizingAlpha1995(pair(name, 50000), { start: 0, end: 24 * 50000 });
      expect(Math.abs(r.value! - want[name]!)).toBeLessThanOrEqual(0.02);
    }
  });
  it('identical unitizing gives 1; a coder with no units still counts', () => {
    const spans: Span[] = [
      { coder: 'A', value: 'x', start: 10, end: 20 },
      { coder: 'B', value: 'x', start: 10, end: 20 },
    ];
    expect(unitizingAlpha1995(spans, { start: 0, end: 100 }).value).toBe(1);
    const withSilent = unitizingAlpha1995(spans, { start: 0, end: 100 }, { coders: ['A', 'B', 'C'] });
    expect(withSilent.coders).toBe(3);
    expect(withSilent.value!).toBeLessThan(1);
  });
  it('a category nobody used: null with a reason', () => {
    const r = unitizingAlpha1995([{ coder: 'A', value: 'x', start: 0, end: 5 }], { start: 0, end: 10 }, { coders: ['A', 'B'], categories: ['x', 'y'] });
    expect(r.perCategory[1]).toMatchObject({ category: 'y', value: null, reason: 'no-variation' });
  });
  it('refuses overlapping units of one coder and category, spans outside the continuum, bad offsets', () => {
    const c = { start: 0, end: 50 };
    const bad = (spans: Span[], code: string) => expect(() => unitizingAlpha1995(spans, c)).toThrow(expect.objectContaining({ code }));
    bad([{ coder: 'A', value: 'x', start: 0, end: 10 }, { coder: 'A', value: 'x', start: 5, end: 12 }], 'overlapping-units');
    bad([{ coder: 'A', value: 'x', start: 40, end: 60 }], 'span-outside-continuum');
    bad([{ coder: 'A', value: 'x', start: 4, end: 4 }], 'invalid-value');
    bad([{ coder: 'A', value: 'x', start: 1.5, end: 4 }], 'invalid-value');
  });
});
