import { describe, expect, it } from 'vitest';
import { krippendorffAlpha } from './alpha.js';
import { percentAgreement, percentAgreementFromTable } from './percent.js';
import { fleiss1971Data, k2011C, maryBen, threeValues } from './testdata/published.js';

describe('percentAgreement', () => {
  it('PA-1 two coders, binary: 0.600 (Krippendorff 2004 p.224; DKPro Krippendorff2004Test)', () => {
    const r = percentAgreement(maryBen);
    expect(r.value).toBeCloseTo(0.6, 3);
    expect(r.other.value).toBeCloseTo(0.6, 3);
  });
  it('PA-2 four coders with missing values: 0.800 as 1 - D_o, 0.8182 (9/11) as unit mean (Krippendorff 2004 p.230; DKPro)', () => {
    const r = percentAgreement(k2011C);
    expect(r.convention).toBe('pairable-values');
    expect(r.value).toBeCloseTo(0.8, 3);
    expect(r.other).toEqual({ convention: 'unit-mean', value: expect.closeTo(9 / 11, 4) });
    expect(percentAgreement(k2011C, 'unit-mean').value).toBeCloseTo(0.8182, 4);
    expect(r.n).toBe(11);
  });
  it('pairable-values convention equals 1 - D_o of nominal alpha (Krippendorff 2011)', () => {
    for (const d of [maryBen, threeValues, k2011C]) expect(percentAgreement(d).value).toBeCloseTo(1 - krippendorffAlpha(d).D_o!, 12);
  });
  it('PA-3 six raters: P-bar 0.5556 = 5/9 (Fleiss 1971 p.379; DKPro Fleiss1971Test)', () => {
    expect(percentAgreement(fleiss1971Data, 'unit-mean').value).toBeCloseTo(5 / 9, 4);
    expect(percentAgreement(fleiss1971Data).value).toBeCloseTo(5 / 9, 4);
  });
  it('from a table: diagonal share (Artstein & Poesio 2008 p.558: p_o .7)', () => {
    expect(percentAgreementFromTable([[20, 10], [20, 50]]).value).toBeCloseTo(0.7, 10);
  });
  it('no pairable unit: null with a reason', () => {
    expect(percentAgreement([[1, null], [null, 1]])).toMatchObject({ value: null, reason: 'no-pairable-values' });
    expect(percentAgreementFromTable([[0, 0], [0, 0]])).toMatchObject({ value: null, reason: 'no-pairable-values' });
  });
});
