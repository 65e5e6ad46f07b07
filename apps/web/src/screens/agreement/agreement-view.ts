/**
 * Pure helpers of the agreement screen: rows of the per-code and per-pair tables, which figures count
 * as weak, and the places behind one code (for the drill-down). No I/O, no DOM.
 */
import type { Coefficient, CoefficientReport } from '../../api/agreement.js';

/** Three decimals, as Krippendorff (2004) reports alpha; a minus sign that screen readers read. */
export function formatValue(v: number | null | undefined): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  return v.toFixed(3).replace('-', '−');
}

export function formatInterval(ci: [number, number] | null | undefined): string {
  return ci ? `${formatValue(ci[0])} to ${formatValue(ci[1])}` : '—';
}

const REASONS: Record<string, string> = {
  'no-variation': 'no variation: every unit was coded alike, so chance agreement is total',
  'fewer-than-two-coders': 'fewer than two coders',
  'no-pairable-values': 'no unit coded by two coders',
  'texts-with-different-coders': 'texts coded by different sets of coders',
};
export function reasonWords(reason: string | undefined): string {
  return reason ? REASONS[reason] ?? reason.replace(/-/g, ' ') : '';
}

/**
 * Below what a team would accept. Alpha: under Krippendorff's (2004) .800 for reliable variables.
 * Kappa-type: "moderate" or lower in Landis & Koch (1977), i.e. .60 or less. Percent agreement: under
 * .80 (common practice). A value that could not be computed is not called weak: its reason is shown.
 */
export function isWeak(c: Coefficient): boolean {
  if (c.value === null) return false;
  if (c.band) return ['unreliable', 'tentative', 'poor', 'slight', 'fair', 'moderate'].includes(c.band);
  return c.value < 0.8;
}

/** Thresholds drawn on the chart for the statistic's bands (same sources as isWeak). */
export function thresholds(statistic: string): number[] {
  if (statistic === 'krippendorff-alpha' || statistic === 'unitizing-alpha') return [0.667, 0.8];
  if (statistic === 'percent-agreement') return [0.8];
  return [0.2, 0.4, 0.6, 0.8];
}

export interface Row {
  key: string;
  label: string;
  result: Coefficient;
  weak: boolean;
}

export function codeRows(r: CoefficientReport): Row[] {
  const label = new Map(r.codes.map((c) => [c.id, c.label]));
  return r.perCode.map((c) => ({ key: c.codeId, label: label.get(c.codeId) || '(a code no longer in the codebook)', result: c.result, weak: isWeak(c.result) }));
}

export function pairRows(r: CoefficientReport): Row[] {
  const name = new Map(r.coders.map((c) => [c.id, c.name]));
  return r.perCoderPair.map((p) => ({
    key: p.coders.join('+'),
    label: `${name.get(p.coders[0]) || 'a coder'} and ${name.get(p.coders[1]) || 'a coder'}`,
    result: p.result,
    weak: isWeak(p.result),
  }));
}

export interface SegmentLike { id: string; coderId: string; codeId: string; start: number; end: number; quote: string }

/** One stretch of text where some coders applied the code: who did and who did not. */
export interface Place { start: number; end: number; quote: string; by: string[]; without: string[]; segmentIds: string[] }

/**
 * The places behind one code on one text: the chosen coders' segments of that code, overlapping ones
 * joined into one place. Places some coders left out come first (they are what pulls the figure down).
 */
export function placesOfCode(segments: readonly SegmentLike[], codeId: string, coders: readonly string[], text?: string): Place[] {
  const wanted = new Set(coders);
  const own = segments.filter((s) => s.codeId === codeId && wanted.has(s.coderId) && s.end > s.start).sort((a, b) => a.start - b.start || a.end - b.end);
  const out: Array<Place & { seen: Set<string> }> = [];
  for (const s of own) {
    const last = out[out.length - 1];
    if (last && s.start < last.end) {
      last.end = Math.max(last.end, s.end);
      last.seen.add(s.coderId);
      last.segmentIds.push(s.id);
      if (!text && s.quote.length > last.quote.length) last.quote = s.quote;
    } else {
      out.push({ start: s.start, end: s.end, quote: s.quote, by: [], without: [], segmentIds: [s.id], seen: new Set([s.coderId]) });
    }
  }
  const places = out.map(({ seen, ...p }) => ({
    ...p,
    quote: text ? text.slice(p.start, p.end) : p.quote,
    by: coders.filter((c) => seen.has(c)),
    without: coders.filter((c) => !seen.has(c)),
  }));
  return places.sort((a, b) => Number(b.without.length > 0) - Number(a.without.length > 0) || a.start - b.start);
}
