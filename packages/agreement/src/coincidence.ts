import type { EncodedData } from './encode.js';

/**
 * Krippendorff's coincidence matrix: o[c*k+d] = sum over units u of (pairs of values c,d in u)/(m_u - 1),
 * counting ordered pairs of different coders. Units with fewer than two values are not pairable and
 * are skipped. Built in one pass over the units.
 */
export interface Coincidences {
  /** number of distinct values */
  k: number;
  o: Float64Array;
  /** marginals n_c = sum_d o[c][d] */
  nc: Float64Array;
  /** pairable values n = sum_c n_c */
  n: number;
  /** units with at least two values */
  pairableUnits: number;
}

export function coincidences(data: EncodedData): Coincidences {
  const { coders, units, cells } = data;
  const k = data.values.length;
  const o = new Float64Array(k * k);
  const buf = new Int32Array(coders);
  let pairableUnits = 0;
  for (let u = 0; u < units; u++) {
    let m = 0;
    for (let c = 0, at = u; c < coders; c++, at += units) {
      const v = cells[at]!;
      if (v >= 0) buf[m++] = v;
    }
    if (m < 2) continue;
    pairableUnits++;
    const w = 1 / (m - 1);
    for (let i = 0; i < m; i++) {
      const a = buf[i]! * k;
      for (let j = i + 1; j < m; j++) {
        const b = buf[j]!;
        o[a + b] = o[a + b]! + w;
        const ba = b * k + buf[i]!;
        o[ba] = o[ba]! + w;
      }
    }
  }
  return withMarginals(o, k, pairableUnits);
}

/** Coincidences from a square contingency table of two coders (rows coder 1): o = T + T'. */
export function coincidencesFromTable(table: ReadonlyArray<ReadonlyArray<number>>): Coincidences {
  const k = table.length;
  const o = new Float64Array(k * k);
  let units = 0;
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      const t = table[i]![j]!;
      o[i * k + j] = o[i * k + j]! + t;
      o[j * k + i] = o[j * k + i]! + t;
      units += t;
    }
  return withMarginals(o, k, units);
}

export function withMarginals(o: Float64Array, k: number, pairableUnits: number): Coincidences {
  const nc = new Float64Array(k);
  let n = 0;
  for (let c = 0; c < k; c++) {
    let s = 0;
    for (let d = 0; d < k; d++) s += o[c * k + d]!;
    nc[c] = s;
    n += s;
  }
  return { k, o, nc, n, pairableUnits };
}
