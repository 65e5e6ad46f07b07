import { AgreementError } from './errors.js';
import { checkContinuum, checkSpan, coderList, partition, sweep, type Continuum, type Section, type Span } from './spans.js';
import type { Estimate, Value } from './types.js';

export interface UnitizingCategory extends Estimate {
  category: Value;
  D_o: number;
  D_e: number;
  /** units of this category, all coders */
  units: number;
}

export interface Unitizing1995Result extends Estimate {
  statistic: 'unitizing-alpha';
  variant: 'u1995';
  /** mean over categories of the category D_o (as in Krippendorff 2004 and DKPro) */
  D_o: number | null;
  D_e: number | null;
  coders: number;
  perCategory: UnitizingCategory[];
}

/**
 * Krippendorff's unitizing alpha for free spans, one category at a time (Krippendorff 1995,
 * Sociological Methodology 25:47-76; 2004, Content Analysis 2nd ed., ch. 12.4). A coder's units of one
 * category must not overlap; units of different categories may. Positions are integers.
 *
 * For category c, each coder's continuum of length L is cut into units of c and gaps. For every pair of
 * coders and every pair of overlapping sections g, h:
 *   delta^2 = (b_g - b_h)^2 + (e_g - e_h)^2   if both are units,
 *           = l_g^2                           if g is a unit lying inside the gap h (and vice versa),
 *           = 0                               otherwise;
 *   D_o = 2 sum delta^2 / (R (R-1) L^2).
 *   D_e = (2/L) sum_units [ (N_c - 1)(2l^3 - 3l^2 + l)/3 + l^2 sum_{gaps h: l_h >= l} (l_h - l + 1) ]
 *         / (R L (R L - 1) - sum_units l (l - 1)),
 * over all coders' units (N_c of them) and gaps. Overall alpha = 1 - mean D_o / mean D_e.
 */
export function unitizingAlpha1995(
  spans: ReadonlyArray<Span>,
  continuum: Continuum,
  options: { coders?: ReadonlyArray<string>; categories?: ReadonlyArray<Value> } = {},
): Unitizing1995Result {
  checkContinuum(continuum);
  if (!Array.isArray(spans)) throw new AgreementError('invalid-input', 'spans must be an array');
  for (const s of spans) checkSpan(s, continuum);
  const coders = coderList(spans, options.coders);
  const R = coders.length;
  const categories = options.categories ? [...options.categories] : [...new Set(spans.map((s) => s.value))];
  const empty = { statistic: 'unitizing-alpha' as const, variant: 'u1995' as const, coders: R };
  if (R < 2) {
    for (const c of categories) for (const coder of coders) sectionsOf(spans, continuum, coder, c); // still refuse bad input
    return { ...empty, value: null, reason: 'no-pairable-values', D_o: null, D_e: null, perCategory: [] };
  }
  const perCategory = categories.map((c) => categoryAlpha(spans, continuum, coders, c));
  if (perCategory.length === 0) return { ...empty, value: null, reason: 'no-variation', D_o: null, D_e: null, perCategory };
  const D_o = perCategory.reduce((s, x) => s + x.D_o, 0) / perCategory.length;
  const D_e = perCategory.reduce((s, x) => s + x.D_e, 0) / perCategory.length;
  return D_e === 0
    ? { ...empty, value: null, reason: 'no-variation', D_o, D_e, perCategory }
    : { ...empty, value: 1 - D_o / D_e, D_o, D_e, perCategory };
}

function categoryAlpha(spans: ReadonlyArray<Span>, continuum: Continuum, coders: string[], category: Value): UnitizingCategory {
  const R = coders.length;
  const L = continuum.end - continuum.start;
  const sections: Section[][] = coders.map((coder) => sectionsOf(spans, continuum, coder, category));
  let observed = 0;
  for (let a = 0; a < R; a++)
    for (let b = a + 1; b < R; b++)
      sweep(sections[a]!, sections[b]!, (g, h) => {
        const gUnit = g.value >= 0;
        const hUnit = h.value >= 0;
        if (gUnit && hUnit) {
          const ds = g.start - h.start;
          const de = g.end - h.end;
          observed += ds * ds + de * de;
        } else if (gUnit && h.start <= g.start && g.end <= h.end) observed += (g.end - g.start) ** 2;
        else if (hUnit && g.start <= h.start && h.end <= g.end) observed += (h.end - h.start) ** 2;
      });
  const D_o = (2 * observed) / (R * (R - 1) * L * L);

  const unitLengths: number[] = [];
  const gaps: number[] = [];
  for (const list of sections) for (const s of list) (s.value >= 0 ? unitLengths : gaps).push(s.end - s.start);
  gaps.sort((x, y) => x - y);
  // suffix sums of gap lengths so sum_{gaps >= l} (l_h - l + 1) is one binary search away
  const suffix = new Float64Array(gaps.length + 1);
  for (let i = gaps.length - 1; i >= 0; i--) suffix[i] = suffix[i + 1]! + gaps[i]!;
  const Nc = unitLengths.length;
  let squared = 0;
  let sum = 0;
  for (const l of unitLengths) {
    squared += l * (l - 1);
    let lo = 0;
    let hi = gaps.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (gaps[mid]! < l) lo = mid + 1;
      else hi = mid;
    }
    const count = gaps.length - lo;
    sum += ((Nc - 1) * (2 * l * l * l - 3 * l * l + l)) / 3 + l * l * (suffix[lo]! - count * (l - 1));
  }
  const D_e = Nc === 0 ? 0 : ((2 / L) * sum) / (R * L * (R * L - 1) - squared);
  const base = { category, D_o, D_e, units: Nc };
  return D_e === 0 ? { ...base, value: null, reason: 'no-variation' } : { ...base, value: 1 - D_o / D_e };
}

function sectionsOf(spans: ReadonlyArray<Span>, continuum: Continuum, coder: string, category: Value): Section[] {
  const own = spans.filter((s) => s.coder === coder && s.value === category).map((s) => ({ start: s.start, end: s.end, value: 0 }));
  return partition(own, continuum, `coder ${coder} (category ${String(category)})`);
}
