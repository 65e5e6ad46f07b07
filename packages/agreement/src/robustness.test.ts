import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { AgreementError } from './errors.js';
import {
  agreementReport,
  bennettS,
  bootstrapAlpha,
  codeConfusion,
  cohenKappa,
  fleissKappa,
  krippendorffAlpha,
  percentAgreement,
  scottPi,
  unitizingAlpha1995,
  unitizingAlpha2016,
} from './index.js';

/** Either a result or a typed AgreementError; never another exception, never NaN in the output. */
function survives(fn: () => unknown): void {
  try {
    const out = fn();
    const bad: unknown[] = [];
    JSON.stringify(out, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) && bad.push(v), v));
    expect(bad).toEqual([]);
  } catch (e) {
    expect(e).toBeInstanceOf(AgreementError);
  }
}

const junk = fc.anything({ maxDepth: 3 });
const nearlyValid = fc.array(fc.array(fc.oneof(fc.integer({ min: -2, max: 4 }), fc.constant(null), fc.string({ maxLength: 2 }), fc.double(), junk), { maxLength: 6 }), {
  maxLength: 4,
});
const spans = fc.array(
  fc.record({ coder: fc.oneof(fc.constantFrom('a', 'b', 'c'), junk), value: fc.oneof(fc.constantFrom('x', 'y'), junk), start: fc.oneof(fc.integer({ min: -3, max: 25 }), junk), end: fc.oneof(fc.integer({ min: -3, max: 25 }), junk) }),
  { maxLength: 8 },
);

describe('bad input never escapes as anything but AgreementError (fuzz, common practice)', () => {
  it('coefficients on junk and nearly valid data', () => {
    fc.assert(
      fc.property(fc.oneof(junk, nearlyValid), (data) => {
        for (const level of ['nominal', 'ordinal', 'interval', 'ratio'] as const) survives(() => krippendorffAlpha(data as never, { level }));
        survives(() => percentAgreement(data as never));
        survives(() => bootstrapAlpha(data as never, { replicates: 5 }));
        survives(() => cohenKappa(data as never));
        survives(() => scottPi(data as never));
        survives(() => bennettS(data as never));
        survives(() => fleissKappa(data as never));
      }),
      { numRuns: 300 },
    );
  });
  it('a span whose offsets cannot even be printed (fast-check counterexample, seed 1476747404)', () => {
    const spansIn = [{ coder: 'a', value: 'x', start: { toString: 0 }, end: undefined }];
    expect(() => unitizingAlpha1995(spansIn as never, { start: 0, end: 1 })).toThrow(AgreementError);
    const text = { textId: 't', textLength: 5, segments: [{ coderId: 'a', codeId: 'x', start: { toString: 0 }, end: 2 }] };
    survives(() => agreementReport({ texts: [text] } as never, { unit: 'character' } as never));
  });
  it('unitizing on junk spans', () => {
    fc.assert(
      fc.property(spans, fc.oneof(fc.record({ start: fc.integer({ min: -2, max: 2 }), end: fc.integer({ min: -2, max: 25 }) }), junk), (s, c) => {
        survives(() => unitizingAlpha1995(s as never, c as never));
        survives(() => unitizingAlpha2016(s as never, c as never));
      }),
      { numRuns: 300 },
    );
  });
  it('report and confusion on junk studies', () => {
    const segment = fc.record({ coderId: fc.oneof(fc.constantFrom('a', 'b'), junk), codeId: fc.oneof(fc.constantFrom('x', 'y'), junk), start: fc.oneof(fc.integer({ min: -1, max: 12 }), junk), end: fc.oneof(fc.integer({ min: -1, max: 12 }), junk) });
    const text = fc.record({
      textId: fc.string(),
      textLength: fc.oneof(fc.integer({ min: 0, max: 12 }), junk),
      units: fc.option(fc.array(fc.oneof(fc.record({ start: fc.integer({ min: -1, max: 12 }), end: fc.integer({ min: -1, max: 12 }) }), junk), { maxLength: 4 }), { nil: undefined }),
      segments: fc.oneof(fc.array(segment, { maxLength: 6 }), junk),
    });
    fc.assert(
      fc.property(fc.oneof(fc.record({ texts: fc.array(text, { maxLength: 3 }) }), junk), (study) => {
        for (const unit of ['fixed', 'character'] as const) survives(() => agreementReport(study as never, { unit, bootstrap: { replicates: 5 }, unitizing: true }));
        survives(() => codeConfusion((study as { texts?: unknown })?.texts as never, 'a', 'b'));
      }),
      { numRuns: 300 },
    );
  });
});
