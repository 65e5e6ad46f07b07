import { cohenKappa, krippendorffAlpha, tableFromData } from '@gloss/agreement';
import { describe, expect, it } from 'vitest';
import { coefficient } from './statistics.js';

// Invented binary data; the package computes the reference values (its own tests check them against
// published examples).
const x = [1, 1, 0, 0, 1, 0, 0, 0];
const y = [1, 0, 0, 0, 1, 0, 1, 0];
const z = [1, 1, 0, 1, 1, 0, 0, 0];

describe('coefficient by name', () => {
  it('alpha and two-coder kappa are the package values, with their band', () => {
    const a = coefficient('krippendorff-alpha', [x, y]);
    expect(a.value).toBe(krippendorffAlpha([x, y]).value);
    expect(a.band).toBeDefined();
    expect(coefficient('cohen-kappa', [x, y]).value).toBe(cohenKappa(tableFromData([x, y]).table).value);
  });

  it("with three coders Cohen's kappa is the mean over pairs (Light 1971)", () => {
    const k = (p: number[], q: number[]) => cohenKappa(tableFromData([p, q]).table).value!;
    expect(coefficient('cohen-kappa', [x, y, z]).value).toBeCloseTo((k(x, y) + k(x, z) + k(y, z)) / 3, 12);
  });

  it("Fleiss' kappa leaves out units with a missing value; one coder gives no value", () => {
    const full = coefficient('fleiss-kappa', [x.slice(1), y.slice(1), z.slice(1)]);
    const gap = coefficient('fleiss-kappa', [[null, ...x.slice(1)], y, z]);
    expect(gap.value).toBeCloseTo(full.value!, 12);
    expect(coefficient('percent-agreement', [x])).toMatchObject({ value: null, reason: 'fewer-than-two-coders' });
  });
});
