/**
 * Unitizing alpha (Krippendorff 1995/2004, packages/agreement) over several texts laid end to end,
 * all given codes as categories, for the pooled figure and coder pairs of a free-span report (the
 * study report gives it per code and per text). Texts where not every coder has a layer are left
 * out: unitizing takes no missing data.
 */
import { unitizingAlpha1995, unitizingSpans, krippendorffBand } from '@gloss/agreement';
import type { TextInput } from './data.js';
import type { Coefficient } from './statistics.js';

export function unitizingOver(texts: readonly TextInput[], codes: readonly string[], coders: readonly string[]): Coefficient {
  const statistic = 'unitizing-alpha' as const;
  if (coders.length < 2) return { statistic, value: null, reason: 'fewer-than-two-coders' };
  const usable = texts.filter((t) => t.textLength > 0 && coders.every((c) => t.coders.includes(c)));
  const length = usable.reduce((s, t) => s + t.textLength, 0);
  if (length === 0) return { statistic, value: null, reason: 'no-pairable-values' };
  const wanted = new Set(coders);
  let offset = 0;
  const spans = usable.flatMap((t) => {
    const out = unitizingSpans(t, codes)
      .filter((s) => wanted.has(s.coder))
      .map((s) => ({ ...s, start: s.start + offset, end: s.end + offset }));
    offset += t.textLength;
    return out;
  });
  const r = unitizingAlpha1995(spans, { start: 0, end: length }, { coders, categories: codes });
  return {
    statistic,
    value: r.value,
    ...(r.value === null ? { reason: r.reason ?? 'no-variation' } : { band: krippendorffBand(r.value) }),
    detail: { variant: 'Krippendorff 1995/2004', texts: usable.length, textsLeftOut: texts.length - usable.length },
  };
}
