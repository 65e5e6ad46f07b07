import { AgreementError } from './errors.js';
import { checkTable } from './table.js';
import type { Estimate } from './types.js';

/** z for a two-sided 95% interval. */
export const Z95 = 1.959963984540054;

export interface ChanceCorrected extends Estimate {
  statistic: 'cohen-kappa' | 'scott-pi' | 'bennett-s';
  /** observed agreement (proportion on the diagonal) */
  p_o: number | null;
  /** chance agreement under the coefficient's model */
  p_e: number | null;
  /** number of units in the table */
  n: number;
}

export interface KappaResult extends ChanceCorrected {
  statistic: 'cohen-kappa';
  /** asymptotic SE of Fleiss, Cohen & Everitt (1969), as SAS PROC FREQ reports it */
  se: number | null;
  /** kappa +- 1.96 se */
  ci: [number, number] | null;
  /** SE under H0: kappa = 0 (Fleiss, Cohen & Everitt 1969) */
  se0: number | null;
  /** kappa / se0 */
  z: number | null;
}

interface Margins {
  n: number;
  k: number;
  p: number[][];
  rows: number[];
  cols: number[];
  p_o: number;
}

function margins(table: ReadonlyArray<ReadonlyArray<number>>): Margins {
  checkTable(table);
  const k = table.length;
  let n = 0;
  for (const row of table) for (const x of row) n += x;
  if (!Number.isFinite(n)) throw new AgreementError('invalid-value', 'table total overflows');
  const p = table.map((row) => row.map((x) => (n > 0 ? x / n : 0)));
  const rows = p.map((row) => row.reduce((s, x) => s + x, 0));
  const cols = p[0]!.map((_, j) => p.reduce((s, row) => s + row[j]!, 0));
  let p_o = 0;
  for (let i = 0; i < k; i++) p_o += p[i]![i]!;
  return { n, k, p, rows, cols, p_o };
}

function finish<S extends ChanceCorrected['statistic']>(statistic: S, m: Margins, p_e: number) {
  if (m.n === 0) return { statistic, value: null, reason: 'no-pairable-values' as const, p_o: null, p_e: null, n: 0 };
  if (p_e >= 1 - 1e-15) return { statistic, value: null, reason: 'perfect-chance-agreement' as const, p_o: m.p_o, p_e, n: m.n };
  return { statistic, value: (m.p_o - p_e) / (1 - p_e), p_o: m.p_o, p_e, n: m.n };
}

/**
 * Cohen's (1960) kappa from a square table (rows = coder 1). p_e = sum_i p_i. p_.i.
 *
 * Standard errors (Fleiss, Cohen & Everitt 1969, Psych. Bull. 72:323-327):
 *   se^2  = [ sum_i p_ii (1 - (p_i. + p_.i)(1 - k))^2 + (1 - k)^2 sum_{i!=j} p_ij (p_.i + p_j.)^2
 *             - (k - p_e (1 - k))^2 ] / (N (1 - p_e)^2)
 *   se0^2 = [ p_e + p_e^2 - sum_i p_i. p_.i (p_i. + p_.i) ] / (N (1 - p_e)^2)
 * (Cohen's 1960 approximation sqrt(p_o(1 - p_o) / (N (1 - p_e)^2)) is not reported.)
 */
export function cohenKappa(table: ReadonlyArray<ReadonlyArray<number>>): KappaResult {
  const m = margins(table);
  let p_e = 0;
  for (let i = 0; i < m.k; i++) p_e += m.rows[i]! * m.cols[i]!;
  const base = finish('cohen-kappa', m, p_e);
  if (base.value === null) return { ...base, se: null, ci: null, se0: null, z: null };
  const kap = base.value;
  const { p, rows, cols, k, n } = m;
  let a = 0;
  let b = 0;
  let h0 = 0;
  for (let i = 0; i < k; i++) {
    const t = 1 - (rows[i]! + cols[i]!) * (1 - kap);
    a += p[i]![i]! * t * t;
    h0 += rows[i]! * cols[i]! * (rows[i]! + cols[i]!);
    for (let j = 0; j < k; j++) {
      if (i === j) continue;
      const s = cols[i]! + rows[j]!;
      b += p[i]![j]! * s * s;
    }
  }
  b *= (1 - kap) * (1 - kap);
  const c = kap - p_e * (1 - kap);
  const denom = n * (1 - p_e) * (1 - p_e);
  const se = Math.sqrt(Math.max(0, a + b - c * c) / denom);
  const se0 = Math.sqrt(Math.max(0, p_e + p_e * p_e - h0) / denom);
  return { ...base, se, ci: [kap - Z95 * se, kap + Z95 * se], se0, z: se0 > 0 ? kap / se0 : null };
}

/** Scott's (1955) pi: p_e = sum_i ((p_i. + p_.i)/2)^2, the two coders' pooled distribution. */
export function scottPi(table: ReadonlyArray<ReadonlyArray<number>>): ChanceCorrected {
  const m = margins(table);
  let p_e = 0;
  for (let i = 0; i < m.k; i++) {
    const q = (m.rows[i]! + m.cols[i]!) / 2;
    p_e += q * q;
  }
  return finish('scott-pi', m, p_e);
}

/**
 * Bennett, Alpert & Goldstein's (1954) S: p_e = 1/q for q possible categories. q defaults to the
 * table's size; pass the number of categories in the codebook when some were never used.
 */
export function bennettS(table: ReadonlyArray<ReadonlyArray<number>>, categories?: number): ChanceCorrected {
  const m = margins(table);
  const q = categories ?? m.k;
  return finish('bennett-s', m, 1 / Math.max(1, q));
}
