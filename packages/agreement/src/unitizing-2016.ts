import { AgreementError } from './errors.js';
import { checkContinuum, checkSpan, coderList, partition, sweep, type Continuum, type Section, type Span } from './spans.js';
import type { Estimate, Value } from './types.js';

export interface ValueUAlpha extends Estimate {
  category: Value;
  /** percentage of this value's matter that meets valued matter of other coders */
  coverage: number;
}

export interface Unitizing2016Result {
  statistic: 'unitizing-alpha';
  /** u-alpha: all segments, gaps included (nominal) */
  u: Estimate;
  /** |u-alpha: valued matter vs. gaps, values ignored */
  binary: Estimate;
  /** cu-alpha: the values of intersecting valued segments only */
  cu: Estimate & { coverage: number };
  /** (k)u-alpha for each value k */
  perValue: ValueUAlpha[];
  coders: number;
  /** pairable length m * L */
  n: number;
}

/**
 * The unitizing alpha family of Krippendorff, Mathet, Bouvry & Widlöcher (2016), "On the reliability
 * of unitizing textual continua: further developments", Quality & Quantity 50:2347-2364, nominal
 * metric. Each coder's spans must be disjoint; the gaps between them become segments of their own
 * (value "gap"), so every coder partitions the continuum.
 *
 *   o_ck = sum over ordered coder pairs, over overlapping segments g (value c), h (value k) of |g ∩ h| / (m-1)
 *   e_ck = l (n_c n_k - [c=k] S_c) / (l^2 - sum_c S_c), l = m L, S_c = sum of l_g^2 over segments of value c
 *          (for the gap value: sum of l_g, as the published implementations do)
 *   u-alpha = 1 - (l - sum_c o_cc) / (l - sum_c e_cc);  |u-alpha uses gap vs. not-gap.
 *   cu-alpha and (k)u-alpha drop the gap value: n'_c = n_c - o_c,gap, l' = sum n'_c,
 *   e'_ck = (n'_c n'_k - [c=k] S'_c/(m-1)) / (l' - S'/(l'(m-1))), S'_c = sum over ordered pairs and
 *   valued segments g of value c of (length of g meeting valued segments of the other coder)^2.
 *   (k)u-alpha = 1 - (e'_k / n'_k) (n'_k - o_kk) / (e'_k - e'_kk), e'_k = sum_c e'_ck.
 * Check values for |u, cu and (k)u come from one implementation only (see the tests).
 */
export function unitizingAlpha2016(
  spans: ReadonlyArray<Span>,
  continuum: Continuum,
  options: { coders?: ReadonlyArray<string>; categories?: ReadonlyArray<Value> } = {},
): Unitizing2016Result {
  checkContinuum(continuum);
  if (!Array.isArray(spans)) throw new AgreementError('invalid-input', 'spans must be an array');
  for (const s of spans) checkSpan(s, continuum);
  const coders = coderList(spans, options.coders);
  const m = coders.length;
  const labels = options.categories ? [...options.categories] : [...new Set(spans.map((s) => s.value))];
  const index = new Map<Value, number>();
  labels.forEach((v, i) => index.set(v, i + 1)); // 0 = gap
  const V = labels.length + 1;
  const L = continuum.end - continuum.start;
  const l = m * L;
  const undefinedAll = (reason: 'no-pairable-values' | 'no-variation'): Unitizing2016Result => ({
    statistic: 'unitizing-alpha',
    u: { value: null, reason },
    binary: { value: null, reason },
    cu: { value: null, reason, coverage: 0 },
    perValue: [],
    coders: m,
    n: m >= 2 ? l : 0,
  });
  const parts: Section[][] = coders.map((coder) =>
    partition(
      spans.filter((s) => s.coder === coder).map((s) => {
        const v = index.get(s.value);
        if (v === undefined) throw new AgreementError('invalid-value', `value ${String(s.value)} is not among the categories`);
        return { start: s.start, end: s.end, value: v };
      }),
      continuum,
      `coder ${coder}`,
    ).map((s) => (s.value < 0 ? { ...s, value: 0 } : s)),
  );
  if (m < 2) return undefinedAll('no-pairable-values');

  const o = new Float64Array(V * V);
  const S = new Float64Array(V);
  const Sv = new Float64Array(V); // S'_c
  for (const list of parts)
    for (const s of list) {
      const len = s.end - s.start;
      S[s.value] = S[s.value]! + (s.value === 0 ? len : len * len);
    }
  for (let a = 0; a < m; a++)
    for (let b = 0; b < m; b++) {
      if (a === b) continue;
      let current: Section | null = null;
      let meet = 0;
      sweep(parts[a]!, parts[b]!, (g, h, ov) => {
        const at = g.value * V + h.value;
        o[at] = o[at]! + ov / (m - 1);
        if (g !== current) {
          if (current && current.value > 0) Sv[current.value] = Sv[current.value]! + meet * meet;
          current = g;
          meet = 0;
        }
        if (g.value > 0 && h.value > 0) meet += ov;
      });
      const last = current as Section | null;
      if (last && last.value > 0) Sv[last.value] = Sv[last.value]! + meet * meet;
    }
  const n = new Float64Array(V);
  for (let c = 0; c < V; c++) for (let k = 0; k < V; k++) n[c] = n[c]! + o[c * V + k]!;
  const sumS = S.reduce((x, y) => x + y, 0);
  const denom = l * l - sumS;
  const e = new Float64Array(V * V);
  for (let c = 0; c < V; c++) for (let k = 0; k < V; k++) e[c * V + k] = (l * (n[c]! * n[k]! - (c === k ? S[c]! : 0))) / denom;

  let oDiag = 0;
  let eDiag = 0;
  for (let c = 0; c < V; c++) {
    oDiag += o[c * V + c]!;
    eDiag += e[c * V + c]!;
  }
  const ratio = (num: number, den: number): Estimate => (den === 0 ? { value: null, reason: 'no-variation' } : { value: 1 - num / den });
  const u = ratio(l - oDiag, l - eDiag);
  let e0 = 0;
  for (let k = 0; k < V; k++) e0 += e[k]!;
  const binary: Estimate = n[0] === 0 ? { value: null, reason: 'no-variation' } : ratio(n[0]! - o[0]!, e0 - e[0]!);

  // cu and (k)u: valued matter meeting valued matter
  const used = labels.map((_, i) => i + 1).filter((c) => n[c]! > 0);
  const nv = new Float64Array(V);
  for (const c of used) nv[c] = n[c]! - o[c * V]!;
  const lv = used.reduce((s, c) => s + nv[c]!, 0);
  const total = n.reduce((x, y) => x + y, 0);
  const coverage = total > 0 ? (100 * lv) / total : 0;
  if (used.length < 2 || lv === 0) {
    const reason = used.length < 2 ? 'too-few-categories' : 'no-pairable-values';
    return { statistic: 'unitizing-alpha', u, binary, cu: { value: null, reason, coverage }, perValue: [], coders: m, n: l };
  }
  const sumSv = used.reduce((s, c) => s + Sv[c]!, 0);
  const den2 = lv - sumSv / (lv * (m - 1));
  // No room for chance: all valued matter meets in single intersections (e.g. one overlap only).
  if (!(den2 > 1e-12 * lv)) {
    const perValue: ValueUAlpha[] = labels.map((label, i) => ({
      category: label,
      value: null,
      reason: 'no-variation',
      coverage: n[i + 1]! > 0 ? (100 * nv[i + 1]!) / n[i + 1]! : 0,
    }));
    return { statistic: 'unitizing-alpha', u, binary, cu: { value: null, reason: 'no-variation', coverage }, perValue, coders: m, n: l };
  }
  const ev = (c: number, k: number) => (nv[c]! * nv[k]! - (c === k ? Sv[c]! / (m - 1) : 0)) / den2;
  let oVal = 0;
  let eVal = 0;
  for (const c of used) {
    oVal += o[c * V + c]!;
    eVal += ev(c, c);
  }
  const cu = { ...ratio(lv - oVal, lv - eVal), coverage };
  const perValue: ValueUAlpha[] = labels.map((label, i) => {
    const k = i + 1;
    const cov = n[k]! > 0 ? (100 * nv[k]!) / n[k]! : 0;
    if (nv[k]! === 0) return { category: label, value: null, reason: 'no-pairable-values', coverage: cov };
    let ek = 0;
    for (const c of used) ek += ev(c, k);
    const ekk = ev(k, k);
    const r = ek - ekk === 0 ? null : 1 - ((ek / nv[k]!) * (nv[k]! - o[k * V + k]!)) / (ek - ekk);
    return r === null ? { category: label, value: null, reason: 'no-variation', coverage: cov } : { category: label, value: r, coverage: cov };
  });
  return { statistic: 'unitizing-alpha', u, binary, cu, perValue, coders: m, n: l };
}
