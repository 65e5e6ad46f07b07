import { coincidences, type Coincidences } from './coincidence.js';
import { AgreementError } from './errors.js';
import { distanceMatrix } from './distance.js';
import { encodeReliabilityData, type EncodedData } from './encode.js';
import { nominalTallies, type NominalTallies } from './nominal-fast.js';
import type { Estimate, Level, ReliabilityData, Value } from './types.js';

export interface AlphaOptions {
  level?: Level;
  /** explicit order of values; required for ordinal string values */
  order?: ReadonlyArray<Value>;
}

export interface ValueAlpha extends Estimate {
  category: Value;
  /** pairable values of this category, n_c */
  n: number;
}

export interface AlphaResult extends Estimate {
  statistic: 'krippendorff-alpha';
  level: Level;
  /** observed disagreement D_o = (1/n) sum o_cd delta^2_cd */
  D_o: number | null;
  /** expected disagreement D_e = 1/(n(n-1)) sum n_c n_d delta^2_cd */
  D_e: number | null;
  /** pairable values */
  n: number;
  /** units with at least two values */
  units: number;
  /** nominal only: alpha of each value against all others pooled (the data recoded to c / not c) */
  perValue?: ValueAlpha[];
}

/**
 * Krippendorff's alpha = 1 - D_o / D_e by the coincidence-matrix method (Krippendorff 2004, ch. 11;
 * 2011). Missing values are allowed; units with fewer than two values drop out.
 */
export function krippendorffAlpha(data: ReliabilityData, options: AlphaOptions = {}): AlphaResult {
  const level = options.level ?? 'nominal';
  if (level === 'nominal' && !options.order) return nominalAlpha(nominalTallies(data));
  const enc = encodeReliabilityData(data, { level, order: options.order });
  return alphaFromEncoded(enc, level);
}

export function alphaFromEncoded(enc: EncodedData, level: Level): AlphaResult {
  return alphaFromCoincidences(coincidences(enc), enc.values, level);
}

export function alphaFromCoincidences(co: Coincidences, values: ReadonlyArray<Value>, level: Level): AlphaResult {
  const { k, o, nc, n } = co;
  const base = { statistic: 'krippendorff-alpha' as const, level, n, units: co.pairableUnits };
  if (n < 2 || co.pairableUnits === 0) return { ...base, value: null, reason: 'no-pairable-values', D_o: null, D_e: null };
  const delta = distanceMatrix(level, values, nc);
  let obs = 0;
  let exp = 0;
  for (let c = 0; c < k; c++)
    for (let d = 0; d < k; d++) {
      const dd = delta[c * k + d]!;
      if (dd === 0) continue;
      obs += o[c * k + d]! * dd;
      exp += nc[c]! * nc[d]! * dd;
    }
  if (!Number.isFinite(obs) || !Number.isFinite(exp))
    throw new AgreementError('invalid-value', 'values too large: the disagreement sums overflow; rescale the values');
  const D_o = obs / n;
  const D_e = exp / (n * (n - 1));
  const result: AlphaResult =
    D_e === 0 ? { ...base, value: null, reason: 'no-variation', D_o, D_e } : { ...base, value: 1 - D_o / D_e, D_o, D_e };
  if (level === 'nominal') result.perValue = valueAlphas(values, Float64Array.from({ length: k }, (_, c) => o[c * k + c]!), nc, n);
  return result;
}

/** Nominal alpha from the diagonal and marginals alone: D_o = (n - sum o_cc)/n, D_e = (n^2 - sum n_c^2)/(n(n-1)). */
function nominalAlpha(t: NominalTallies): AlphaResult {
  const { n, nc, diag } = t;
  const base = { statistic: 'krippendorff-alpha' as const, level: 'nominal' as const, n, units: t.pairableUnits };
  if (n < 2 || t.pairableUnits === 0) return { ...base, value: null, reason: 'no-pairable-values', D_o: null, D_e: null };
  let agree = 0;
  let squares = 0;
  for (let c = 0; c < nc.length; c++) {
    agree += diag[c]!;
    squares += nc[c]! * nc[c]!;
  }
  const D_o = (n - agree) / n;
  const D_e = (n * n - squares) / (n * (n - 1));
  const perValue = valueAlphas(t.values, diag, nc, n);
  return D_e === 0 ? { ...base, value: null, reason: 'no-variation', D_o, D_e, perValue } : { ...base, value: 1 - D_o / D_e, D_o, D_e, perValue };
}

/** alpha_c = 1 - (n-1)(n_c - o_cc) / (n_c (n - n_c)): nominal alpha of the data recoded to c vs. not c. */
function valueAlphas(values: ReadonlyArray<Value>, diag: ArrayLike<number>, nc: ArrayLike<number>, n: number): ValueAlpha[] {
  const out: ValueAlpha[] = [];
  for (let c = 0; c < values.length; c++) {
    const nC = nc[c]!;
    const denom = nC * (n - nC);
    out.push(
      denom === 0
        ? { category: values[c]!, n: nC, value: null, reason: 'no-variation' }
        : { category: values[c]!, n: nC, value: 1 - ((n - 1) * (nC - diag[c]!)) / denom },
    );
  }
  return out;
}
