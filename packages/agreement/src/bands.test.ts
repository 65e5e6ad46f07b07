import { describe, expect, it } from 'vitest';
import { krippendorffBand, landisKoch } from './bands.js';

describe('interpretation bands', () => {
  it('BENCH-1 Landis & Koch (1977) p.165 cut points; ranges closed above; "poor" below 0 from memory of the paper', () => {
    const cases: Array<[number, string]> = [
      [-0.01, 'poor'], [0, 'slight'], [0.2, 'slight'], [0.21, 'fair'], [0.4, 'fair'], [0.6, 'moderate'],
      [0.61, 'substantial'], [0.8, 'substantial'], [0.81, 'almost perfect'], [1, 'almost perfect'],
    ];
    for (const [v, band] of cases) expect(landisKoch(v)).toBe(band);
  });
  it('BENCH-2 Krippendorff (2004) .800 / .667 thresholds (page from memory, unconfirmed)', () => {
    expect(krippendorffBand(0.8)).toBe('reliable');
    expect(krippendorffBand(0.7999)).toBe('tentative');
    expect(krippendorffBand(0.667)).toBe('tentative');
    expect(krippendorffBand(0.6669)).toBe('unreliable');
  });
});
