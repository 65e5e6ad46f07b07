import fc from 'fast-check';
import { alpha as npmAlpha } from 'krippendorff';
import { describe, expect, it } from 'vitest';
import { alphaFromCoincidences, krippendorffAlpha } from './alpha.js';
import { coincidences } from './coincidence.js';
import { encodeReliabilityData } from './encode.js';
import { scottPi } from './kappa.js';
import type { Level } from './types.js';
import { tableFromData } from './table.js';
import { k1995A, k2011C, maryBen, threeValues, wikipedia } from './testdata/published.js';

const close = (x: number | null, want: number, digits: number) => expect(x).toBeCloseTo(want, digits);

describe('krippendorffAlpha: published values', () => {
  it('KA-1 nominal, 2 coders binary: .095, D_o .400, D_e .442 (Krippendorff 2011 ex. A; 2004 p.224)', () => {
    const r = krippendorffAlpha(maryBen);
    close(r.value, 0.095, 3);
    close(r.D_o, 0.4, 3);
    close(r.D_e, 0.442, 3);
    expect(r.n).toBe(20);
  });
  it('KA-2 nominal, 3 values: .734, D_o .1667, D_e .6268 (Krippendorff 2004 p.227)', () => {
    const r = krippendorffAlpha(threeValues);
    close(r.value, 0.734, 3);
    close(r.D_o, 0.1667, 4);
    close(r.D_e, 0.6268, 4);
  });
  it('KA-3 nominal with missing values: .743, D_o .200, D_e .779, 40 pairable values (Krippendorff 2011 ex. C)', () => {
    const r = krippendorffAlpha(k2011C);
    close(r.value, 0.743421, 5);
    close(r.D_o, 0.2, 3);
    close(r.D_e, 0.779, 3);
    expect(r.n).toBe(40);
    expect(r.units).toBe(11);
  });
  it('KA-4 ordinal: .815 (Krippendorff 2011 ex. C; fast-krippendorff docstring)', () => {
    close(krippendorffAlpha(k2011C, { level: 'ordinal' }).value, 0.815388, 5);
  });
  it('KA-5 interval: .849, D_o .433, D_e 2.872 (Krippendorff 2011 ex. C)', () => {
    const r = krippendorffAlpha(k2011C, { level: 'interval' });
    close(r.value, 0.849107, 5);
    close(r.D_o, 0.433, 3);
    close(r.D_e, 2.872, 3);
  });
  it('KA-6 ratio: .797 (Krippendorff 2011 ex. C; fast-krippendorff docstring)', () => {
    close(krippendorffAlpha(k2011C, { level: 'ratio' }).value, 0.797403, 5);
  });
  it('KA-7 Wikipedia example: nominal .691358, interval .810845 (Wikipedia; npm krippendorff test)', () => {
    close(krippendorffAlpha(wikipedia).value, 0.691358, 6);
    close(krippendorffAlpha(wikipedia, { level: 'interval' }).value, 0.810845, 6);
  });
  it('SP-2 nominal alpha on digitised spans: .329 (Krippendorff 1995 p.57 pair A; DKPro)', () => {
    close(krippendorffAlpha(k1995A).value, 0.329, 3);
  });
  it('ordinal string values follow the given order', () => {
    const words = k2011C.map((row) => row.map((v) => (v === null ? null : ['lo', 'mid-lo', 'mid', 'mid-hi', 'hi'][v - 1]!)));
    const r = krippendorffAlpha(words, { level: 'ordinal', order: ['lo', 'mid-lo', 'mid', 'mid-hi', 'hi'] });
    close(r.value, 0.815388, 5);
  });
});

describe('krippendorffAlpha: undefined cases return null with a reason', () => {
  it('one value only', () => {
    const r = krippendorffAlpha([[1, 1, 1], [1, 1, 1]]);
    expect(r.value).toBeNull();
    expect(r.reason).toBe('no-variation');
  });
  it('no pairable unit', () => {
    const r = krippendorffAlpha([[1, null], [null, 2]]);
    expect(r).toMatchObject({ value: null, reason: 'no-pairable-values' });
  });
  it('no data', () => expect(krippendorffAlpha([]).reason).toBe('no-pairable-values'));
});

describe('krippendorffAlpha: bad input is refused with a typed error', () => {
  it.each([
    [[[1, NaN]], 'invalid-value'],
    [[[1, {}]], 'invalid-value'],
    [[['a', 'b']], 'not-numeric', 'interval'],
    [[['a', 'b']], 'ordinal-needs-order', 'ordinal'],
    [[[1, 'b']], 'mixed-value-types', 'ordinal'],
    [[[-1, 2]], 'invalid-value', 'ratio'],
    ['nope', 'invalid-input'],
  ] as Array<[unknown, string, Level?]>)('%j -> %s', (data, code, level) => {
    expect(() => krippendorffAlpha(data as never, { level: level ?? 'nominal' })).toThrow(expect.objectContaining({ code }));
  });
});

const matrix = (values: number, missing: boolean) =>
  fc
    .record({ coders: fc.integer({ min: 2, max: 5 }), units: fc.integer({ min: 1, max: 30 }) })
    .chain(({ coders, units }) =>
      fc.array(
        fc.array(missing ? fc.option(fc.integer({ min: 1, max: values }), { nil: null, freq: 4 }) : fc.integer({ min: 1, max: values }), {
          minLength: units,
          maxLength: units,
        }),
        { minLength: coders, maxLength: coders },
      ),
    );

describe('krippendorffAlpha: properties (fast-check)', () => {
  it('perfect agreement gives 1 whenever defined', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 4 }), { minLength: 2, maxLength: 40 }), fc.integer({ min: 2, max: 5 }), (row, coders) => {
        const r = krippendorffAlpha(Array.from({ length: coders }, () => row));
        if (new Set(row).size > 1) expect(r.value).toBe(1);
        else expect(r.reason).toBe('no-variation');
      }),
    );
  });
  it('invariant under permuting coders, units and (nominal) relabelling values', () => {
    fc.assert(
      fc.property(matrix(4, true), fc.integer({ min: 0, max: 1000 }), (data, salt) => {
        const base = krippendorffAlpha(data).value;
        const coders = [...data].reverse();
        const units = data.map((row) => row.map((_, u) => row[(u + salt) % row.length]!));
        const relabel = data.map((row) => row.map((v) => (v === null ? null : `v${(v * 7 + salt) % 11}`)));
        for (const other of [coders, units]) {
          const v = krippendorffAlpha(other).value;
          if (base === null) expect(v).toBeNull();
          else expect(v).toBeCloseTo(base, 10);
        }
        // relabelling is injective for v in 1..4 since 7 is invertible mod 11
        const r = krippendorffAlpha(relabel).value;
        if (base === null) expect(r).toBeNull();
        else expect(r).toBeCloseTo(base, 10);
      }),
    );
  });
  it('ordinal alpha depends on the order of values only: invariant under a strictly increasing recoding', () => {
    fc.assert(
      fc.property(matrix(5, true), (data) => {
        const base = krippendorffAlpha(data, { level: 'ordinal' }).value;
        const recoded = data.map((row) => row.map((v) => (v === null ? null : v * v * v + 10)));
        const r = krippendorffAlpha(recoded, { level: 'ordinal' }).value;
        if (base === null) expect(r).toBeNull();
        else expect(r).toBeCloseTo(base, 10);
      }),
    );
  });
  it('interval alpha is invariant under an affine change of scale', () => {
    fc.assert(
      fc.property(matrix(6, true), (data) => {
        const base = krippendorffAlpha(data, { level: 'interval' }).value;
        const scaled = data.map((row) => row.map((v) => (v === null ? null : 3 * v - 10)));
        const r = krippendorffAlpha(scaled, { level: 'interval' }).value;
        if (base === null) expect(r).toBeNull();
        else expect(r).toBeCloseTo(base, 9);
      }),
    );
  });
  it('two coders, nominal, no missing: alpha = 1 - (1 - pi)(2N - 1)/(2N) (Krippendorff 2004 p.250, relation to Scott pi; common practice)', () => {
    fc.assert(
      fc.property(matrix(3, false).filter((d) => d.length === 2), (data) => {
        const a = krippendorffAlpha(data).value;
        const pi = scottPi(tableFromData(data).table).value;
        const N = data[0]!.length;
        if (a === null || pi === null) return;
        expect(a).toBeCloseTo(1 - ((1 - pi) * (2 * N - 1)) / (2 * N), 10);
      }),
    );
  });
  it('perValue alpha equals alpha of the data recoded to value / not value', () => {
    fc.assert(
      fc.property(matrix(3, true), (data) => {
        const r = krippendorffAlpha(data);
        for (const pv of r.perValue ?? []) {
          const recoded = data.map((row) => row.map((v) => (v === null ? null : v === pv.category ? 1 : 0)));
          const want = krippendorffAlpha(recoded).value;
          if (want === null) expect(pv.value).toBeNull();
          else expect(pv.value).toBeCloseTo(want, 10);
        }
      }),
    );
  });
});

describe('krippendorffAlpha: the one-pass nominal path agrees with the full coincidence matrix', () => {
  it('same value, D_o, D_e and per-value alphas (property)', () => {
    fc.assert(
      fc.property(matrix(5, true), (data) => {
        const fast = krippendorffAlpha(data);
        const enc = encodeReliabilityData(data);
        const full = alphaFromCoincidences(coincidences(enc), enc.values, 'nominal');
        expect(fast.reason).toBe(full.reason);
        expect(fast.n).toBeCloseTo(full.n, 9);
        expect(fast.units).toBe(full.units);
        if (full.value !== null) expect(fast.value).toBeCloseTo(full.value, 10);
        if (full.D_o !== null) expect(fast.D_o).toBeCloseTo(full.D_o, 10);
        expect((fast.perValue ?? []).map((v) => v.category)).toEqual((full.perValue ?? []).map((v) => v.category));
        (fast.perValue ?? []).forEach((v, i) => (v.value === null ? expect(full.perValue![i]!.value).toBeNull() : expect(v.value).toBeCloseTo(full.perValue![i]!.value!, 10)));
      }),
    );
  });
});

describe('krippendorffAlpha: agrees with npm krippendorff 0.1.0 on random matrices', () => {
  const toNpm = (data: (number | null)[][]) => data.map((row) => row.map((v) => (v === null ? undefined : v)));
  it('nominal', () => {
    fc.assert(
      fc.property(matrix(4, true), (data) => {
        const ours = krippendorffAlpha(data).value;
        const theirs = npmAlpha(toNpm(data));
        if (ours === null) expect(Number.isNaN(theirs) || !Number.isFinite(theirs)).toBe(true);
        else expect(ours).toBeCloseTo(theirs, 9);
      }),
    );
  });
  it('interval', () => {
    fc.assert(
      fc.property(matrix(7, true), (data) => {
        const ours = krippendorffAlpha(data, { level: 'interval' }).value;
        const theirs = npmAlpha(toNpm(data), (a: number, b: number) => (a - b) ** 2);
        if (ours === null) expect(Number.isNaN(theirs) || !Number.isFinite(theirs)).toBe(true);
        else expect(ours).toBeCloseTo(theirs, 9);
      }),
    );
  });
});
