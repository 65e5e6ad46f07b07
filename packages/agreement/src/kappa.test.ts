import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bennettS, cohenKappa, scottPi } from './kappa.js';
import { confusionMatrix, tableFromData } from './table.js';
import { k1995A, maryBen } from './testdata/published.js';

describe('cohenKappa', () => {
  it('CK-1 Cohen (1960) p.45: kappa .492, p_o .70, p_e .41; FCE-1969 ASE .0510 (SE computed by the check-value author, not published)', () => {
    const r = cohenKappa([[88, 14, 18], [10, 40, 10], [2, 6, 12]]);
    expect(r.value).toBeCloseTo(0.49153, 4);
    expect(r.p_o).toBeCloseTo(0.7, 10);
    expect(r.p_e).toBeCloseTo(0.41, 10);
    expect(r.se).toBeCloseTo(0.051, 3);
    expect(r.se0).toBeCloseTo(0.052, 3);
    expect(r.n).toBe(200);
  });
  it('CK-3 SAS PROC FREQ printout (statsmodels test_inter_rater.py): kappa .4842, ASE .1380, CI [.2137,.7547], ASE0 .1484, z 3.2626', () => {
    const r = cohenKappa([[0, 4, 1], [0, 8, 0], [0, 1, 5]]);
    expect(r.value).toBeCloseTo(0.4842, 4);
    expect(r.se).toBeCloseTo(0.138, 4);
    expect(r.ci![0]).toBeCloseTo(0.2137, 4);
    expect(r.ci![1]).toBeCloseTo(0.7547, 4);
    expect(r.se0).toBeCloseTo(0.1484, 4);
    expect(r.z).toBeCloseTo(3.2626, 4);
  });
  it('CK-2 Artstein & Poesio (2008) p.558: kappa .348 (p_e .54), pi .341 (p_e .545), S .400', () => {
    const t = [[20, 10], [20, 50]];
    const k = cohenKappa(t);
    expect(k.value).toBeCloseTo(0.348, 3);
    expect(k.p_e).toBeCloseTo(0.54, 3);
    const p = scottPi(t);
    expect(p.value).toBeCloseTo(0.341, 3);
    expect(p.p_e).toBeCloseTo(0.545, 3);
    expect(bennettS(t).value).toBeCloseTo(0.4, 3);
  });
  it('SP-2 Krippendorff (1995) p.57 pair A digitised: kappa .385, pi .314 (DKPro Krippendorff1995Test)', () => {
    const t = tableFromData(k1995A).table;
    expect(cohenKappa(t).value).toBeCloseTo(0.385, 3);
    expect(scottPi(t).value).toBeCloseTo(0.314, 3);
  });
  it('KA-1 data: kappa .0909, pi .0476 (computed by the check-value author; Krippendorff 2011 ex. A data)', () => {
    const t = tableFromData(maryBen).table;
    expect(cohenKappa(t).value).toBeCloseTo(0.0909, 4);
    expect(scottPi(t).value).toBeCloseTo(0.0476, 4);
  });
  it('Bennett S uses the number of possible categories when given', () => {
    expect(bennettS([[20, 10], [20, 50]], 4).value).toBeCloseTo((0.7 - 0.25) / 0.75, 12);
  });
  it('undefined: one category used by both coders -> null, perfect-chance-agreement', () => {
    expect(cohenKappa([[10, 0], [0, 0]])).toMatchObject({ value: null, reason: 'perfect-chance-agreement', se: null });
    expect(scottPi([[0, 0], [0, 0]])).toMatchObject({ value: null, reason: 'no-pairable-values' });
  });
  it('refuses a table that is not square or has negative cells', () => {
    expect(() => cohenKappa([[1, 2, 3], [1, 2, 3]])).toThrow(expect.objectContaining({ code: 'not-square' }));
    expect(() => cohenKappa([[1, -2], [1, 2]])).toThrow(expect.objectContaining({ code: 'invalid-value' }));
  });
  it('properties: transposing the table (swapping coders) leaves kappa, pi and SEs unchanged; kappa <= 1', () => {
    const cell = fc.integer({ min: 0, max: 30 });
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 4 }).chain((k) => fc.array(fc.array(cell, { minLength: k, maxLength: k }), { minLength: k, maxLength: k })), (t) => {
        const tt = t[0]!.map((_, j) => t.map((row) => row[j]!));
        const a = cohenKappa(t);
        const b = cohenKappa(tt);
        if (a.value === null) {
          expect(b.value).toBeNull();
          return;
        }
        expect(b.value).toBeCloseTo(a.value, 10);
        expect(b.se!).toBeCloseTo(a.se!, 10);
        expect(a.value).toBeLessThanOrEqual(1 + 1e-12);
        expect(scottPi(tt).value).toBeCloseTo(scottPi(t).value!, 10);
      }),
    );
  });
});

describe('confusionMatrix', () => {
  it('counts pairs, drops units with a missing value, keeps a given category order', () => {
    const r = confusionMatrix(['a', 'b', 'b', null, 'c'], ['a', 'c', 'b', 'a', 'c'], ['c', 'b', 'a']);
    expect(r.categories).toEqual(['c', 'b', 'a']);
    expect(r.table).toEqual([
      [1, 0, 0],
      [1, 1, 0],
      [0, 0, 1],
    ]);
  });
});
