/**
 * Free spans: Krippendorff's unitizing alpha (2016 family, packages/agreement) per code, where each
 * coder's units are their segments of that code, merged where they overlap (one coder's matter is
 * either coded or not). Several texts (and, pooled, several codes) are laid end to end on one
 * continuum, each keeping its own stretch. The figure is |u-alpha (binary: coded matter vs gaps),
 * the natural measure when the value is the code itself.
 */
import { krippendorffBand, unitizingAlpha2016, type Span } from '@gloss/agreement';
import type { Coefficient } from './statistics.js';
import type { TextInput } from './data.js';

function merged(spans: ReadonlyArray<{ start: number; end: number }>): Array<{ start: number; end: number }> {
  const s = spans.filter((x) => x.end > x.start).sort((a, b) => a.start - b.start);
  const out: Array<{ start: number; end: number }> = [];
  for (const x of s) {
    const last = out[out.length - 1];
    if (last && x.start <= last.end) last.end = Math.max(last.end, x.end);
    else out.push({ ...x });
  }
  return out;
}

export function spanCoefficient(texts: readonly TextInput[], codes: readonly string[], coders: readonly string[]): Coefficient {
  if (coders.length < 2) return { statistic: 'unitizing-alpha', value: null, reason: 'fewer-than-two-coders' };
  const units: Span[] = [];
  let offset = 0;
  let skipped = 0;
  for (const t of texts) {
    // A coder without a layer on a text has no partition there: unitizing cannot take missing data,
    // so such a text counts only when every coder has a layer on it.
    if (t.text.length === 0) continue;
    if (!coders.every((c) => t.layers.has(c))) {
      skipped++;
      continue;
    }
    for (const codeId of codes) {
      for (const coder of coders) {
        for (const m of merged(t.layers.get(coder)!.filter((s) => s.codeId === codeId))) {
          units.push({ coder, value: 'coded', start: offset + m.start, end: offset + m.end });
        }
      }
      offset += t.text.length;
    }
  }
  if (offset === 0) return { statistic: 'unitizing-alpha', value: null, reason: 'no-pairable-values' };
  const r = unitizingAlpha2016(units, { start: 0, end: offset }, { coders, categories: ['coded'] });
  const value = r.binary.value;
  return {
    statistic: 'unitizing-alpha',
    value,
    ...(r.binary.reason ? { reason: r.binary.reason } : {}),
    ...(value !== null ? { band: krippendorffBand(value) } : {}),
    detail: { variant: 'binary-u (Krippendorff, Mathet et al. 2016)', length: offset, textsWithoutAllCoders: skipped },
  };
}
