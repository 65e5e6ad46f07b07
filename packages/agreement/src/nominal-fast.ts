import { dataShape } from './encode.js';
import { AgreementError } from './errors.js';
import type { ReliabilityData, Value } from './types.js';

/**
 * What nominal alpha needs, in one pass over the data: the coincidence matrix's diagonal o_cc and
 * marginals n_c (per unit with m values, n_uc of value c: o_cc += n_uc (n_uc - 1)/(m - 1), n_c += n_uc).
 * Skips building the full matrix and the separate encoding pass; values are indexed as met and
 * sorted at the end.
 */
export interface NominalTallies {
  values: Value[];
  diag: Float64Array;
  nc: Float64Array;
  n: number;
  pairableUnits: number;
}

const SMALL = 1024;

export function nominalTallies(data: ReliabilityData): NominalTallies {
  const { coders, units } = dataShape(data);
  const small = new Int32Array(SMALL).fill(-1);
  const seen = new Map<Value, number>();
  const met: Value[] = [];
  const diag: number[] = [];
  const nc: number[] = [];
  const counts: number[] = [];
  const buf = new Int32Array(coders);
  let n = 0;
  let pairableUnits = 0;
  for (let u = 0; u < units; u++) {
    let m = 0;
    for (let c = 0; c < coders; c++) {
      const v = data[c]![u];
      if (v === null || v === undefined) continue;
      let idx: number | undefined;
      if (typeof v === 'number' && v >= 0 && v < SMALL && (v | 0) === v) idx = small[v]!;
      else idx = seen.get(v) ?? -1;
      if (idx < 0) {
        if (typeof v === 'number') {
          if (!Number.isFinite(v)) throw new AgreementError('invalid-value', `value at coder ${c}, unit ${u} is not a finite number`);
        } else if (typeof v !== 'string')
          throw new AgreementError('invalid-value', `value at coder ${c}, unit ${u} must be a number, a string or null`);
        idx = met.length;
        met.push(v);
        seen.set(v, idx);
        if (typeof v === 'number' && v >= 0 && v < SMALL && (v | 0) === v) small[v] = idx;
        diag.push(0);
        nc.push(0);
        counts.push(0);
      }
      buf[m++] = idx;
    }
    if (m < 2) continue;
    pairableUnits++;
    n += m;
    for (let i = 0; i < m; i++) counts[buf[i]!]!++;
    const w = 1 / (m - 1);
    for (let i = 0; i < m; i++) {
      const idx = buf[i]!;
      const cnt = counts[idx]!;
      if (cnt === 0) continue;
      diag[idx]! += cnt * (cnt - 1) * w;
      nc[idx]! += cnt;
      counts[idx] = 0;
    }
  }
  // Stable output order as in encode.ts: numbers ascending, then strings.
  const order = met
    .map((v, i) => i)
    .sort((a, b) => {
      const x = met[a]!;
      const y = met[b]!;
      if (typeof x !== typeof y) return typeof x === 'number' ? -1 : 1;
      return x < y ? -1 : x > y ? 1 : 0;
    });
  return {
    values: order.map((i) => met[i]!),
    diag: Float64Array.from(order, (i) => diag[i]!),
    nc: Float64Array.from(order, (i) => nc[i]!),
    n,
    pairableUnits,
  };
}
