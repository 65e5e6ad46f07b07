import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countsFromData, fleissKappa } from './fleiss.js';
import { fleiss1971Counts, fleiss1971Data } from './testdata/published.js';

describe('fleissKappa', () => {
  it('FK-1 Fleiss (1971) p.379: kappa .4302445, P-bar .5556, P_e .2199; SE0 .02437, z 17.65183 (R irr kappam.fleiss via statsmodels test_inter_rater.py)', () => {
    const r = fleissKappa(fleiss1971Counts, [1, 2, 3, 4, 5]);
    expect(r.value).toBeCloseTo(0.4302445, 6);
    expect(r.p_o).toBeCloseTo(0.5556, 4);
    expect(r.p_e).toBeCloseTo(0.2199, 4);
    expect(r.se0).toBeCloseTo(0.02437, 5);
    expect(r.z).toBeCloseTo(17.65183, 4);
    expect(r.n).toBe(30);
    expect(r.raters).toBe(6);
  });
  it('FK-1 per category: .245 .245 .520 .471 .566 (recomputed by the check-value author; DKPro asserts within .005)', () => {
    const r = fleissKappa(fleiss1971Counts);
    const want = [0.245, 0.245, 0.52, 0.471, 0.566];
    r.perCategory.forEach((c, j) => expect(c.value).toBeCloseTo(want[j]!, 3));
  });
  it('counts from reliability data give the same kappa', () => {
    const { categories, counts } = countsFromData(fleiss1971Data);
    expect(categories).toEqual([1, 2, 3, 4, 5]);
    expect(fleissKappa(counts).value).toBeCloseTo(0.4302445, 6);
  });
  it('refuses units with different numbers of raters, and non-integer counts', () => {
    expect(() => fleissKappa([[1, 1], [2, 1]])).toThrow(expect.objectContaining({ code: 'unequal-raters' }));
    expect(() => fleissKappa([[1.5, 1]])).toThrow(expect.objectContaining({ code: 'invalid-value' }));
  });
  it('one category only: null with a reason; per-category too', () => {
    const r = fleissKappa([[3, 0], [3, 0]]);
    expect(r).toMatchObject({ value: null, reason: 'no-variation' });
    expect(r.perCategory[1]).toMatchObject({ value: null, reason: 'no-variation' });
  });
  it('perfect agreement with two categories gives 1', () => {
    expect(fleissKappa([[3, 0], [0, 3], [3, 0]]).value).toBeCloseTo(1, 12);
  });
});

describe('fleissKappa: properties (fast-check)', () => {
  it('invariant under permuting units and categories; equals Scott-type agreement P-bar when computed from data', () => {
    const row = fc.array(fc.integer({ min: 0, max: 4 }), { minLength: 3, maxLength: 3 });
    fc.assert(
      fc.property(fc.array(row, { minLength: 1, maxLength: 20 }), (rows) => {
        // give every unit 4 raters: put the rest in category 0
        const counts = rows.map((r) => {
          const s = r.reduce((a, b) => a + b, 0);
          return s > 4 ? [4, 0, 0, 0] : [4 - s, ...r];
        });
        const a = fleissKappa(counts);
        const b = fleissKappa([...counts].reverse().map((r) => [r[2]!, r[0]!, r[3]!, r[1]!]));
        if (a.value === null) {
          expect(b.value).toBeNull();
          return;
        }
        expect(b.value).toBeCloseTo(a.value, 10);
        expect(b.se0!).toBeCloseTo(a.se0!, 10);
      }),
    );
  });
});
