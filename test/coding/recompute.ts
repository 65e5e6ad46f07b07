/**
 * An independent recomputation of the agreement report's turn-level figures from what the API serves,
 * for checking against the npm `krippendorff` package (0.1.0; its README cites the Wikipedia article's
 * definition). Reliability data as the report documents it (and as is common practice for multi-code
 * data): each (text, code, speaker turn) is a unit valued 1 when the coder has a segment of that code
 * sharing a character with the turn, 0 when not, and missing when the coder is not a coder of that text.
 */
import { alpha } from 'krippendorff';
import { loadDemo } from '../../demo/load.js';
import { parseTurns } from '../../demo/verify.js';

export interface ServedSegment {
  coderId: string;
  codeId: string;
  start: number;
  end: number;
  quote: string;
}

export interface Unit {
  start: number;
  end: number;
}

/** Speaker turns as stored: the turns' words joined by one line break, each turn owning its break. */
export function turnUnits(turnTexts: readonly string[]): { text: string; units: Unit[] } {
  const units: Unit[] = [];
  let at = 0;
  turnTexts.forEach((t, i) => {
    const end = at + t.length + (i < turnTexts.length - 1 ? 1 : 0);
    units.push({ start: at, end });
    at = end;
  });
  return { text: turnTexts.join('\n'), units };
}

/** The turns of a demo text, from the demo's own files (demo/texts), found by the text's title. */
export function demoTurns(title: string): { text: string; units: Unit[] } {
  const demo = loadDemo();
  const entry = (demo.index as Array<{ file: string; title: string }>).find((e) => e.title === title);
  if (!entry) throw new Error(`no demo text titled ${title}`);
  return turnUnits(parseTurns(demo.texts[entry.file]!).map((t) => t!.speech));
}

export interface RecomputeText {
  units: Unit[];
  segments: readonly ServedSegment[];
  /** Who is a coder of this text (everyone else is missing on it). */
  coders: readonly string[];
}

/** Rows (one per coder) of the package's rating matrix over every text, code and turn. */
export function ratingMatrix(texts: readonly RecomputeText[], coders: readonly string[], codes: readonly string[]): Array<Array<number | undefined>> {
  return coders.map((coder) =>
    texts.flatMap((t) =>
      codes.flatMap((code) =>
        t.units.map((u) => {
          if (!t.coders.includes(coder)) return undefined;
          return t.segments.some((s) => s.coderId === coder && s.codeId === code && s.start < u.end && s.end > u.start) ? 1 : 0;
        }),
      ),
    ),
  );
}

/** Krippendorff's alpha (nominal) by the npm package over that matrix. */
export function npmAlpha(texts: readonly RecomputeText[], coders: readonly string[], codes: readonly string[]): number {
  return alpha(ratingMatrix(texts, coders, codes));
}
