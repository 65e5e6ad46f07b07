/**
 * The pure part of a trainee's progress point (issue 9 item 6): the comparison categories summed over a
 * round's texts, the coefficient (or why there is none; in a reflexive study never one), and the drift
 * flag. progress.ts loads the layers and computes the statistic; this decides what the point says.
 */
import type { Comparison } from '@gloss/model';

export interface CategoryCounts {
  matched: number;
  missed: number;
  extra: number;
  otherCode: number;
  otherBoundary: number;
}

export const zeroCounts = (): CategoryCounts => ({ matched: 0, missed: 0, extra: 0, otherCode: 0, otherBoundary: 0 });

/** Every code's counts of every text's comparison, added up by category. */
export function sumCounts(comparisons: readonly Pick<Comparison, 'counts'>[]): CategoryCounts {
  const out = zeroCounts();
  for (const cmp of comparisons) for (const c of Object.values(cmp.counts)) for (const k of Object.keys(out) as Array<keyof CategoryCounts>) out[k] += c[k];
  return out;
}

export const NO_REFERENCE = 'No reference on this round’s texts (choose one, or adjudicate the consensus layer).';
export const REFLEXIVE = 'Reflexive study: no coefficient, only the counts.';

/**
 * The point's coefficient. `compute` runs the round's statistic and is called only when there is
 * something to compare and the study is not reflexive (reflexive thematic analysis does not measure
 * agreement: Braun & Clarke 2019, "Reflecting on reflexive thematic analysis").
 */
export async function pointValue(opts: {
  reflexive: boolean;
  texts: number;
  compute: () => Promise<{ value: number | null; reason?: string | undefined }>;
}): Promise<{ value: number | null; note?: string }> {
  if (opts.texts === 0) return { value: null, note: NO_REFERENCE };
  if (opts.reflexive) return { value: null, note: REFLEXIVE };
  const { value, reason } = await opts.compute();
  return value === null ? { value, note: reason ?? 'The statistic could not be computed.' } : { value };
}

/**
 * Drift: the value fell by more than `threshold` since the trainee's latest earlier point that has a
 * value (points without one — no reference, not computable — are stepped over). A fall of exactly the
 * threshold is not drift.
 */
export function isDrift(earlier: readonly { value: number | null }[], value: number | null, threshold: number): boolean {
  if (value === null) return false;
  const previous = [...earlier].reverse().find((p) => p.value !== null);
  return previous !== undefined && previous.value! - value > threshold;
}
