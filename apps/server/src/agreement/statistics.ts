/**
 * One coefficient over reliability data, by name, with packages/agreement doing the arithmetic.
 * Cohen's kappa and Scott's pi are two-coder coefficients: with more coders the value is the mean over
 * coder pairs (for kappa this is Light's kappa, Light 1971) and the pairs are listed.
 */
import {
  cohenKappa,
  countsFromData,
  fleissKappa,
  krippendorffAlpha,
  krippendorffBand,
  landisKoch,
  percentAgreement,
  scottPi,
  tableFromData,
  type Cell,
} from '@gloss/agreement';

export const STATISTICS = ['krippendorff-alpha', 'cohen-kappa', 'scott-pi', 'fleiss-kappa', 'percent-agreement'] as const;
export type Statistic = (typeof STATISTICS)[number];

export interface Coefficient {
  statistic: Statistic | 'unitizing-alpha';
  value: number | null;
  reason?: string;
  /** Interpretation band: Krippendorff (2004) thresholds for alpha; Landis & Koch (1977) for kappa-type. */
  band?: string;
  ci?: [number, number] | null;
  detail?: Record<string, unknown>;
}

const pairs = <T>(xs: readonly T[]): Array<[T, T]> => xs.flatMap((a, i) => xs.slice(i + 1).map((b) => [a, b] as [T, T]));

function band(statistic: Coefficient['statistic'], value: number | null): string | undefined {
  if (value === null) return undefined;
  if (statistic === 'krippendorff-alpha' || statistic === 'unitizing-alpha') return krippendorffBand(value);
  if (statistic === 'percent-agreement') return undefined;
  return landisKoch(value);
}

function twoCoder(statistic: 'cohen-kappa' | 'scott-pi', rows: Cell[][]): Coefficient {
  const one = (a: Cell[], b: Cell[]) => {
    const { table } = tableFromData([a, b]);
    return statistic === 'cohen-kappa' ? cohenKappa(table) : scottPi(table);
  };
  if (rows.length === 2) {
    const r = one(rows[0]!, rows[1]!);
    const { value, reason, statistic: _s, ...rest } = r;
    return { statistic, value, ...(reason ? { reason } : {}), detail: rest };
  }
  const each = pairs(rows.map((_, i) => i)).map(([i, j]) => ({ pair: [i, j], ...one(rows[i]!, rows[j]!) }));
  const defined = each.filter((e) => e.value !== null);
  if (defined.length === 0) return { statistic, value: null, reason: each[0]?.reason ?? 'no-pairable-values' };
  return {
    statistic,
    value: defined.reduce((s, e) => s + e.value!, 0) / defined.length,
    detail: { method: 'mean over coder pairs (Light 1971)', pairs: each.map((e) => ({ pair: e.pair, value: e.value })) },
  };
}

export function coefficient(statistic: Statistic, rows: Cell[][]): Coefficient {
  const out = ((): Coefficient => {
    if (rows.length < 2) return { statistic, value: null, reason: 'fewer-than-two-coders' };
    switch (statistic) {
      case 'krippendorff-alpha': {
        const { value, reason, statistic: _s, ...rest } = krippendorffAlpha(rows, { level: 'nominal' });
        return { statistic, value, ...(reason ? { reason } : {}), detail: rest };
      }
      case 'percent-agreement': {
        const { value, reason, statistic: _s, ...rest } = percentAgreement(rows);
        return { statistic, value, ...(reason ? { reason } : {}), detail: rest };
      }
      case 'cohen-kappa':
      case 'scott-pi':
        return twoCoder(statistic, rows);
      case 'fleiss-kappa': {
        // Fleiss needs every unit rated by all: units with a missing value drop out.
        const n = rows[0]!.length;
        const complete: number[] = [];
        for (let u = 0; u < n; u++) if (rows.every((r) => r[u] !== null && r[u] !== undefined)) complete.push(u);
        if (complete.length === 0) return { statistic, value: null, reason: 'no-pairable-values' };
        const { categories, counts } = countsFromData(rows.map((r) => complete.map((u) => r[u]!)));
        const { value, reason, statistic: _s, perCategory: _p, ...rest } = fleissKappa(counts, categories);
        return { statistic, value, ...(reason ? { reason } : {}), detail: rest };
      }
    }
  })();
  const b = band(out.statistic, out.value);
  return b ? { ...out, band: b } : out;
}
