import { AgreementError } from './errors.js';
import { encodeReliabilityData } from './encode.js';
import type { Estimate, ReliabilityData, Value } from './types.js';

export interface FleissCategory extends Estimate {
  category: Value | number;
  /** share of all ratings in this category, p_j */
  p: number;
  /** SE under H0: sqrt(2 / (N n (n-1))) (Fleiss, Nee & Landis 1979) */
  se0: number;
  z: number | null;
}

export interface FleissResult extends Estimate {
  statistic: 'fleiss-kappa';
  /** mean agreement over units, P-bar */
  p_o: number | null;
  /** chance agreement sum_j p_j^2, P-bar_e */
  p_e: number | null;
  /** SE under H0: kappa = 0 (Fleiss, Nee & Landis 1979, as R irr::kappam.fleiss) */
  se0: number | null;
  z: number | null;
  /** units */
  n: number;
  raters: number;
  perCategory: FleissCategory[];
}

/**
 * Fleiss' (1971) kappa from counts: rows = units, columns = categories, cell = raters who chose it.
 * Every unit must have the same number of raters n >= 2.
 * SE0^2 = 2 / (N n (n-1)) * [ (sum p_j q_j)^2 - sum p_j q_j (q_j - p_j) ] / (sum p_j q_j)^2.
 */
export function fleissKappa(counts: ReadonlyArray<ReadonlyArray<number>>, categories?: ReadonlyArray<Value>): FleissResult {
  if (!Array.isArray(counts) || counts.length === 0) throw new AgreementError('invalid-input', 'counts must be a non-empty array of unit rows');
  if (!Array.isArray(counts[0])) throw new AgreementError('invalid-input', 'every unit row must be an array of counts');
  const k = counts[0].length;
  let raters = -1;
  for (const row of counts) {
    if (!Array.isArray(row) || row.length !== k) throw new AgreementError('invalid-input', 'every unit row needs one count per category');
    let s = 0;
    for (const x of row) {
      if (typeof x !== 'number' || !Number.isSafeInteger(x) || x < 0 || x > 1e6) throw new AgreementError('invalid-value', 'counts must be integers from 0 to 1,000,000');
      s += x;
    }
    if (raters === -1) raters = s;
    else if (s !== raters) throw new AgreementError('unequal-raters', 'Fleiss kappa needs the same number of raters for every unit');
  }
  const N = counts.length;
  const n = raters;
  const labels = categories ?? Array.from({ length: k }, (_, j) => j);
  const empty = { statistic: 'fleiss-kappa' as const, value: null, p_o: null, p_e: null, se0: null, z: null, n: N, raters: n, perCategory: [] };
  if (n < 2) return { ...empty, reason: 'no-pairable-values' };
  const totals = new Array<number>(k).fill(0);
  const disagreements = new Array<number>(k).fill(0); // sum_i n_ij (n - n_ij)
  let pSum = 0;
  for (const row of counts) {
    let sq = 0;
    row.forEach((x: number, j: number) => {
      totals[j]! += x;
      disagreements[j]! += x * (n - x);
      sq += x * x;
    });
    pSum += (sq - n) / (n * (n - 1));
  }
  const p = totals.map((t) => t / (N * n));
  const p_o = pSum / N;
  const p_e = p.reduce((s, x) => s + x * x, 0);
  const pq = p.reduce((s, x) => s + x * (1 - x), 0);
  const pqqp = p.reduce((s, x) => s + x * (1 - x) * (1 - 2 * x), 0);
  const catSe0 = Math.sqrt(2 / (N * n * (n - 1)));
  const perCategory: FleissCategory[] = p.map((pj, j) => {
    const denom = N * n * (n - 1) * pj * (1 - pj);
    if (denom === 0) return { category: labels[j]!, p: pj, value: null, reason: 'no-variation', se0: catSe0, z: null };
    const kj = 1 - disagreements[j]! / denom;
    return { category: labels[j]!, p: pj, value: kj, se0: catSe0, z: kj / catSe0 };
  });
  if (pq === 0) return { ...empty, p_o, p_e, perCategory, reason: 'no-variation' };
  const value = (p_o - p_e) / (1 - p_e);
  const se0 = (Math.sqrt(2) / (pq * Math.sqrt(N * n * (n - 1)))) * Math.sqrt(Math.max(0, pq * pq - pqqp));
  return { statistic: 'fleiss-kappa', value, p_o, p_e, se0, z: se0 > 0 ? value / se0 : null, n: N, raters: n, perCategory };
}

/** Counts (units x categories) from reliability data (coders x units); units must have equal rater counts. */
export function countsFromData(data: ReliabilityData): { categories: Value[]; counts: number[][] } {
  const enc = encodeReliabilityData(data);
  const k = enc.values.length;
  const counts: number[][] = [];
  for (let u = 0; u < enc.units; u++) {
    const row = new Array<number>(k).fill(0);
    let m = 0;
    for (let c = 0; c < enc.coders; c++) {
      const v = enc.cells[c * enc.units + u]!;
      if (v >= 0) {
        row[v]!++;
        m++;
      }
    }
    if (m > 0) counts.push(row);
  }
  return { categories: enc.values, counts };
}
