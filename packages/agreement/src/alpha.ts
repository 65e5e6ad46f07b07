import { coincidences, type Coincidences } from './coincidence.js';
import { distanceMatrix } from './distance.js';
import { encodeReliabilityData, type EncodedData } from './encode.js';
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
  const D_o = obs / n;
  const D_e = exp / (n * (n - 1));
  const result: AlphaResult =
    D_e === 0 ? { ...base, value: null, reason: 'no-variation', D_o, D_e } : { ...base, value: 1 - D_o / D_e, D_o, D_e };
  if (level === 'nominal') result.perValue = valueAlphas(co, values);
  return result;
}

/** alpha_c = 1 - (n-1)(n_c - o_cc) / (n_c (n - n_c)): nominal alpha of the data recoded to c vs. not c. */
function valueAlphas(co: Coincidences, values: ReadonlyArray<Value>): ValueAlpha[] {
  const { k, o, nc, n } = co;
  const out: ValueAlpha[] = [];
  for (let c = 0; c < k; c++) {
    const nC = nc[c]!;
    const denom = nC * (n - nC);
    out.push(
      denom === 0
        ? { category: values[c]!, n: nC, value: null, reason: 'no-variation' }
        : { category: values[c]!, n: nC, value: 1 - ((n - 1) * (nC - o[c * k + c]!)) / denom },
    );
  }
  return out;
}
