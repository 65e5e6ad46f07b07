/**
 * Fixed units of a text for agreement (DESIGN §5): speaker turns, paragraphs, sentences, characters.
 * Paragraphs are the runs between line breaks; sentences end at . ! ? or … followed by a space or the
 * paragraph's end (common practice; abbreviations such as "Dr." will split a sentence).
 */
import type { ResolvedTurn } from '@gloss/model';

export const FIXED_UNITS = ['turn', 'paragraph', 'sentence', 'character'] as const;
export type FixedUnit = (typeof FIXED_UNITS)[number];
export const UNIT_KINDS = [...FIXED_UNITS, 'span'] as const;
export type UnitKind = (typeof UNIT_KINDS)[number];

export interface Unit {
  start: number;
  end: number;
}

export function fixedUnits(kind: FixedUnit, text: string, turns: readonly ResolvedTurn[]): Unit[] {
  switch (kind) {
    case 'turn':
      return turns.filter((t) => t.end > t.start).map((t) => ({ start: t.start, end: t.end }));
    case 'paragraph':
      return paragraphs(text);
    case 'sentence':
      return paragraphs(text).flatMap((p) => sentences(text, p));
    case 'character': {
      const out: Unit[] = new Array(text.length);
      for (let i = 0; i < text.length; i++) out[i] = { start: i, end: i + 1 };
      return out;
    }
  }
}

function paragraphs(text: string): Unit[] {
  const out: Unit[] = [];
  const re = /[^\n]+/g;
  for (let m = re.exec(text); m; m = re.exec(text)) if (m[0].trim()) out.push({ start: m.index, end: m.index + m[0].length });
  return out;
}

function sentences(text: string, p: Unit): Unit[] {
  const slice = text.slice(p.start, p.end);
  const out: Unit[] = [];
  const re = /[.!?\u2026]+["'\u201d\u2019)\]]*(?=\s|$)/g;
  let from = 0;
  for (let m = re.exec(slice); m; m = re.exec(slice)) {
    const to = m.index + m[0].length;
    if (slice.slice(from, to).trim()) out.push({ start: p.start + from, end: p.start + to });
    from = to;
  }
  if (slice.slice(from).trim()) out.push({ start: p.start + from, end: p.end });
  return out;
}
