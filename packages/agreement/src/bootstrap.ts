import { alphaFromEncoded } from './alpha.js';
import { withMarginals } from './coincidence.js';
import { distanceMatrix } from './distance.js';
import { encodeReliabilityData } from './encode.js';
import { AgreementError } from './errors.js';
import { mulberry32, quantile } from './random.js';
import type { Level, ReliabilityData, Value } from './types.js';

export interface BootstrapOptions {
  level?: Level;
  order?: ReadonlyArray<Value>;
  /** number of resamples; default 1000 */
  replicates?: number;
  /** PRNG seed (uint32); same seed, same interval */
  seed?: number;
  /** default 0.95 */
  confidence?: number;
}

export interface BootstrapResult {
  /** alpha on the data as given */
  value: number | null;
  /** percentile interval (type 7 quantiles) of the defined replicate alphas, or null if none was defined */
  ci: [number, number] | null;
  confidence: number;
  replicates: number;
  /** replicates where alpha was undefined (e.g. only one value drawn); left out of the interval */
  undefinedReplicates: number;
  seed: number;
  scheme: 'units';
}

/**
 * Bootstrap interval for Krippendorff's alpha by resampling units: each replicate draws as many
 * pairable units as the data has, with replacement, rebuilds the coincidence matrix and recomputes
 * both D_o and D_e from it. (Krippendorff's own procedure instead resamples pairs of values with
 * D_e held fixed; the two give different intervals.)
 */
export function bootstrapAlpha(data: ReliabilityData, options: BootstrapOptions = {}): BootstrapResult {
  const level = options.level ?? 'nominal';
  const replicates = options.replicates ?? 1000;
  const confidence = options.confidence ?? 0.95;
  const seed = (options.seed ?? 1) >>> 0;
  if (!Number.isInteger(replicates) || replicates < 1) throw new AgreementError('invalid-input', 'replicates must be a positive integer');
  if (!(confidence > 0 && confidence < 1)) throw new AgreementError('invalid-input', 'confidence must lie strictly between 0 and 1');
  const enc = encodeReliabilityData(data, { level, order: options.order });
  const point = alphaFromEncoded(enc, level).value;
  const k = enc.values.length;
  // Each pairable unit's contribution to the coincidence matrix, stored as (cell, weight) runs.
  const starts: number[] = [0];
  const cellsOut: number[] = [];
  const weights: number[] = [];
  const buf = new Int32Array(enc.coders);
  for (let u = 0; u < enc.units; u++) {
    let m = 0;
    for (let c = 0; c < enc.coders; c++) {
      const v = enc.cells[c * enc.units + u]!;
      if (v >= 0) buf[m++] = v;
    }
    if (m < 2) continue;
    const w = 1 / (m - 1);
    for (let i = 0; i < m; i++)
      for (let j = 0; j < m; j++) {
        if (i === j) continue;
        cellsOut.push(buf[i]! * k + buf[j]!);
        weights.push(w);
      }
    starts.push(cellsOut.length);
  }
  const U = starts.length - 1;
  const base = { value: point, confidence, replicates, seed, scheme: 'units' as const };
  if (U === 0) return { ...base, ci: null, undefinedReplicates: replicates };
  const rand = mulberry32(seed);
  const o = new Float64Array(k * k);
  const nominalDelta = level === 'nominal' ? distanceMatrix('nominal', enc.values, new Float64Array(k)) : null;
  const alphas: number[] = [];
  for (let r = 0; r < replicates; r++) {
    o.fill(0);
    for (let i = 0; i < U; i++) {
      const u = Math.floor(rand() * U);
      for (let p = starts[u]!; p < starts[u + 1]!; p++) { const at = cellsOut[p]!; o[at] = o[at]! + weights[p]!; }
    }
    const co = withMarginals(o, k, U);
    const delta = nominalDelta ?? distanceMatrix(level, enc.values, co.nc);
    let obs = 0;
    let exp = 0;
    for (let c = 0; c < k * k; c++) {
      const d = delta[c]!;
      if (d === 0) continue;
      obs += o[c]! * d;
      exp += co.nc[Math.floor(c / k)]! * co.nc[c % k]! * d;
    }
    if (exp > 0) alphas.push(1 - ((co.n - 1) * obs) / exp);
  }
  alphas.sort((a, b) => a - b);
  const tail = (1 - confidence) / 2;
  const ci: [number, number] | null = alphas.length ? [quantile(alphas, tail), quantile(alphas, 1 - tail)] : null;
  return { ...base, ci, undefinedReplicates: replicates - alphas.length };
}
