import { describe, expect, it } from 'vitest';
import { bootstrapAlpha } from './bootstrap.js';
import { mulberry32, quantile } from './random.js';
import { k2011C } from './testdata/published.js';

// BOOT-1: no seeded published bootstrap value exists; a stored Q&A page (R irr + boot, 1000 unit resamples,
// no seed) reports about [0.43, 1.00] for ordinal alpha on Krippendorff (2011) example C. Checked loosely,
// plus properties.
describe('bootstrapAlpha (unit resampling)', () => {
  it('BOOT-1 K2011 ex. C ordinal: point .815; 95% interval near [0.43, 1.00] (+-0.1 on the lower bound; unseeded Q&A value)', () => {
    const r = bootstrapAlpha(k2011C, { level: 'ordinal', seed: 2026 });
    expect(r.value).toBeCloseTo(0.815388, 5);
    expect(Math.abs(r.ci![0] - 0.43)).toBeLessThanOrEqual(0.1);
    expect(r.ci![1]).toBeGreaterThan(0.97);
    expect(r.ci![1]).toBeLessThanOrEqual(1);
  });
  it('interval contains the point estimate', () => {
    for (const level of ['nominal', 'ordinal', 'interval', 'ratio'] as const) {
      const r = bootstrapAlpha(k2011C, { level, seed: 7, replicates: 500 });
      expect(r.ci![0]).toBeLessThanOrEqual(r.value!);
      expect(r.ci![1]).toBeGreaterThanOrEqual(r.value!);
    }
  });
  it('same seed -> identical interval; another seed -> (almost surely) another one', () => {
    const a = bootstrapAlpha(k2011C, { seed: 42 });
    const b = bootstrapAlpha(k2011C, { seed: 42 });
    const c = bootstrapAlpha(k2011C, { seed: 43 });
    expect(a.ci).toEqual(b.ci);
    expect(c.ci).not.toEqual(a.ci);
  });
  it('all-agreeing data -> [1, 1]; draws with one value only are counted as undefined, not NaN', () => {
    const r = bootstrapAlpha([[1, 2, 1, 2, 3], [1, 2, 1, 2, 3]], { seed: 1 });
    expect(r.ci).toEqual([1, 1]);
    expect(Number.isNaN(r.ci![0])).toBe(false);
    expect(r.undefinedReplicates).toBeGreaterThanOrEqual(0);
  });
  it('more units -> narrower interval', () => {
    const rand = mulberry32(99);
    const make = (units: number) => {
      const a: number[] = [];
      const b: number[] = [];
      for (let u = 0; u < units; u++) {
        const v = Math.floor(rand() * 3);
        a.push(v);
        b.push(rand() < 0.8 ? v : Math.floor(rand() * 3));
      }
      return [a, b];
    };
    const width = (units: number) => {
      const ci = bootstrapAlpha(make(units), { seed: 5, replicates: 400 }).ci!;
      return ci[1] - ci[0];
    };
    expect(width(1000)).toBeLessThan(width(50));
  });
  it('refuses bad options', () => {
    expect(() => bootstrapAlpha(k2011C, { replicates: 0 })).toThrow(expect.objectContaining({ code: 'invalid-input' }));
    expect(() => bootstrapAlpha(k2011C, { confidence: 1 })).toThrow(expect.objectContaining({ code: 'invalid-input' }));
  });
});

describe('mulberry32 and quantile', () => {
  it('mulberry32 is deterministic per seed and stays in [0, 1) with a mean near 1/2', () => {
    const a = mulberry32(1);
    const b = mulberry32(1);
    const xs = Array.from({ length: 10000 }, () => a());
    const ys = Array.from({ length: 10000 }, () => b());
    expect(xs).toEqual(ys);
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true);
    expect(Math.abs(xs.reduce((s, x) => s + x, 0) / 10000 - 0.5)).toBeLessThan(0.02);
  });
  it('quantile interpolates linearly (Hyndman & Fan type 7, as R quantile default)', () => {
    // R: quantile(c(1,2,3,4), 0.25) = 1.75
    expect(quantile([1, 2, 3, 4], 0.25)).toBeCloseTo(1.75, 12);
    expect(quantile([5], 0.9)).toBe(5);
  });
});
