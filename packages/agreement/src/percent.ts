import { coincidences } from './coincidence.js';
import { encodeReliabilityData } from './encode.js';
import { checkTable } from './table.js';
import type { Estimate, ReliabilityData } from './types.js';

/**
 * Two conventions for more than two coders or missing values (they coincide for two coders with
 * no missing values, and whenever every unit has the same number of values):
 * - 'pairable-values': share of agreeing ordered value pairs, each unit's pairs weighted 1/(m_u - 1)
 *   as in Krippendorff's coincidence matrix; equals 1 - D_o of nominal alpha. The default.
 * - 'unit-mean': mean over pairable units of the share of agreeing coder pairs in the unit
 *   (Fleiss's 1971 P-bar when every unit has the same raters).
 */
export type PercentConvention = 'pairable-values' | 'unit-mean';

export interface PercentResult extends Estimate {
  statistic: 'percent-agreement';
  convention: PercentConvention;
  /** the same data under the other convention */
  other: { convention: PercentConvention; value: number | null };
  /** pairable units */
  n: number;
}

export function percentAgreement(data: ReliabilityData, convention: PercentConvention = 'pairable-values'): PercentResult {
  const enc = encodeReliabilityData(data);
  const co = coincidences(enc);
  let diag = 0;
  for (let c = 0; c < co.k; c++) diag += co.o[c * co.k + c]!;
  const pairable = co.n > 0 ? diag / co.n : null;
  // unit mean
  const { coders, units, cells } = enc;
  let sum = 0;
  let count = 0;
  const buf = new Int32Array(coders);
  for (let u = 0; u < units; u++) {
    let m = 0;
    for (let c = 0; c < coders; c++) {
      const v = cells[c * units + u]!;
      if (v >= 0) buf[m++] = v;
    }
    if (m < 2) continue;
    let agree = 0;
    for (let i = 0; i < m; i++) for (let j = i + 1; j < m; j++) if (buf[i] === buf[j]) agree++;
    sum += agree / ((m * (m - 1)) / 2);
    count++;
  }
  const unitMean = count > 0 ? sum / count : null;
  const [value, otherValue, other] =
    convention === 'pairable-values' ? [pairable, unitMean, 'unit-mean' as const] : [unitMean, pairable, 'pairable-values' as const];
  return {
    statistic: 'percent-agreement',
    convention,
    value,
    ...(value === null ? { reason: 'no-pairable-values' as const } : {}),
    other: { convention: other, value: otherValue },
    n: count,
  };
}

/** Percent agreement of two coders from a contingency table: the diagonal's share (both conventions agree). */
export function percentAgreementFromTable(table: ReadonlyArray<ReadonlyArray<number>>): PercentResult {
  checkTable(table);
  let n = 0;
  let diag = 0;
  table.forEach((row, i) => row.forEach((x, j) => ((n += x), i === j && (diag += x))));
  const value = n > 0 ? diag / n : null;
  return {
    statistic: 'percent-agreement',
    convention: 'pairable-values',
    value,
    ...(value === null ? { reason: 'no-pairable-values' as const } : {}),
    other: { convention: 'unit-mean', value },
    n,
  };
}
