// The agreement screen's pure helpers. Band cut points: Krippendorff (2004) .800/.667 for alpha,
// Landis & Koch (1977) for kappa-type values (the same sources as packages/agreement/src/bands.ts).
import { describe, expect, it } from 'vitest';
import { codeRows, formatInterval, formatValue, isWeak, pairRows, placesOfCode, thresholds } from './agreement-view.js';
import type { CoefficientReport } from '../../api/agreement.js';

const report: CoefficientReport = {
  kind: 'coefficients',
  unit: 'turn',
  statistic: 'krippendorff-alpha',
  coders: [{ id: 'a', name: 'Ann' }, { id: 'b', name: 'Bo' }],
  texts: [{ id: 't', title: 'P01' }],
  codes: [{ id: 'c1', label: 'Unpaid hours' }, { id: 'c2', label: 'Sociability' }],
  pooled: { statistic: 'krippendorff-alpha', value: 0.7, band: 'tentative' },
  perCode: [
    { codeId: 'c1', result: { statistic: 'krippendorff-alpha', value: 0.85, band: 'reliable', ci: [0.71, 0.95] } },
    { codeId: 'c2', result: { statistic: 'krippendorff-alpha', value: -0.1, band: 'unreliable' } },
  ],
  perText: [],
  perCoderPair: [{ coders: ['a', 'b'], result: { statistic: 'krippendorff-alpha', value: null, reason: 'no-variation' } }],
};

describe('agreement view', () => {
  it('formats values to three decimals with a real minus sign', () => {
    expect(formatValue(0.8)).toBe('0.800');
    expect(formatValue(-0.1234)).toBe('−0.123');
    expect(formatValue(null)).toBe('—');
    expect(formatInterval([0.71, 0.95])).toBe('0.710 to 0.950');
  });

  it('calls a figure weak below the band its source accepts, never one that could not be computed', () => {
    expect(isWeak({ statistic: 'krippendorff-alpha', value: 0.85, band: 'reliable' })).toBe(false);
    expect(isWeak({ statistic: 'krippendorff-alpha', value: 0.7, band: 'tentative' })).toBe(true);
    expect(isWeak({ statistic: 'cohen-kappa', value: 0.61, band: 'substantial' })).toBe(false);
    expect(isWeak({ statistic: 'cohen-kappa', value: 0.6, band: 'moderate' })).toBe(true);
    expect(isWeak({ statistic: 'krippendorff-alpha', value: null, reason: 'no-variation' })).toBe(false);
    expect(thresholds('krippendorff-alpha')).toEqual([0.667, 0.8]);
  });

  it('labels per-code and per-pair rows by name', () => {
    expect(codeRows(report).map((r) => [r.label, r.weak])).toEqual([['Unpaid hours', false], ['Sociability', true]]);
    expect(pairRows(report)[0]).toMatchObject({ label: 'Ann and Bo', weak: false });
  });

  it('joins overlapping segments of one code into places, those some coders left out first', () => {
    const text = 'We stay late every Saturday. Nobody pays us. It is fun.';
    const segs = [
      { id: '1', coderId: 'a', codeId: 'c1', start: 0, end: 27, quote: '' },
      { id: '2', coderId: 'b', codeId: 'c1', start: 3, end: 44, quote: '' },
      { id: '3', coderId: 'a', codeId: 'c1', start: 45, end: 55, quote: '' },
      { id: '4', coderId: 'b', codeId: 'c2', start: 45, end: 55, quote: '' },
      { id: '5', coderId: 'z', codeId: 'c1', start: 45, end: 55, quote: '' },
    ];
    const places = placesOfCode(segs, 'c1', ['a', 'b'], text);
    expect(places).toEqual([
      { start: 45, end: 55, quote: 'It is fun.', by: ['a'], without: ['b'], segmentIds: ['3'] },
      { start: 0, end: 44, quote: 'We stay late every Saturday. Nobody pays us.', by: ['a', 'b'], without: [], segmentIds: ['1', '2'] },
    ]);
  });
});
