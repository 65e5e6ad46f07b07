import type { Level, Value } from './types.js';

/**
 * Squared difference functions delta^2(c, d) of Krippendorff (2004, ch. 11; 2011 "Computing
 * Krippendorff's Alpha-Reliability"), as a k*k matrix over the sorted values.
 * Ordinal uses the marginals: delta^2 = (sum_{g=c..d} n_g - (n_c + n_d)/2)^2.
 */
export function distanceMatrix(level: Level, values: ReadonlyArray<Value>, nc: Float64Array): Float64Array {
  const k = values.length;
  const d = new Float64Array(k * k);
  if (level === 'nominal') {
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) d[i * k + j] = i === j ? 0 : 1;
    return d;
  }
  if (level === 'ordinal') {
    // prefix[i] = n_0 + ... + n_{i-1}
    const prefix = new Float64Array(k + 1);
    for (let i = 0; i < k; i++) prefix[i + 1] = prefix[i]! + nc[i]!;
    for (let i = 0; i < k; i++)
      for (let j = i + 1; j < k; j++) {
        const s = prefix[j + 1]! - prefix[i]! - (nc[i]! + nc[j]!) / 2;
        d[i * k + j] = d[j * k + i] = s * s;
      }
    return d;
  }
  const x = values as ReadonlyArray<number>;
  for (let i = 0; i < k; i++)
    for (let j = i + 1; j < k; j++) {
      const diff = x[i]! - x[j]!;
      let v = diff * diff;
      if (level === 'ratio') {
        const sum = x[i]! + x[j]!;
        v = sum === 0 ? 0 : v / (sum * sum);
      }
      d[i * k + j] = d[j * k + i] = v;
    }
  return d;
}
