/**
 * Segment colours. Okabe, M. & Ito, K. (2008), "Color Universal Design (CUD): How to make figures and
 * presentations that are friendly to colorblind people", https://jfly.uni-koeln.de/color/ — the eight
 * colours below are their published set (hex values as commonly transcribed; from memory, checked
 * against the RGB triples in their table: e.g. orange 230,159,0; sky blue 86,180,233).
 * Black is kept last because it is hard to tell from text; a margin draws it as an outline.
 */
export interface PaletteColour {
  name: string;
  hex: string;
}

export const OKABE_ITO: readonly PaletteColour[] = Object.freeze([
  { name: 'orange', hex: '#E69F00' },
  { name: 'sky blue', hex: '#56B4E9' },
  { name: 'bluish green', hex: '#009E73' },
  { name: 'yellow', hex: '#F0E442' },
  { name: 'blue', hex: '#0072B2' },
  { name: 'vermillion', hex: '#D55E00' },
  { name: 'reddish purple', hex: '#CC79A7' },
  { name: 'black', hex: '#000000' },
]);

/** The colour for the n-th code; after eight the cycle repeats (the margin adds a pattern index). */
export function paletteColour(n: number): { hex: string; pattern: number } {
  const i = ((n % OKABE_ITO.length) + OKABE_ITO.length) % OKABE_ITO.length;
  return { hex: OKABE_ITO[i]!.hex, pattern: Math.floor(Math.max(0, n) / OKABE_ITO.length) };
}

export function isHexColour(s: string): boolean {
  return /^#[0-9A-Fa-f]{6}$/.test(s);
}

/**
 * Marks drawn together with a colour, so that codes sharing a colour are still told apart without
 * relying on colour (WCAG 2.1 SC 1.4.1 "Use of Color": colour is not the only visual means). Each mark
 * is an underline style that also reads in a small swatch.
 */
export const MARKS = ['solid', 'dashed', 'dotted', 'double'] as const;
export type Mark = (typeof MARKS)[number];

/** Colours given to codes without a stored colour of their own: the palette without black (it reads as text). */
const ASSIGNABLE = OKABE_ITO.filter((c) => c.name !== 'black').map((c) => c.hex);

/** How many codes can be told apart by colour and mark: the palette's colours times the marks. */
export const DISTINCT_MARKS = ASSIGNABLE.length * MARKS.length;

export interface CodeMark {
  hex: string;
  mark: Mark;
}

export interface MarkAssignment {
  marks: Map<string, CodeMark>;
  /** More codes than colour-and-mark pairs: some codes necessarily share one. */
  overflow: boolean;
  /**
   * How many colour-and-mark pairs these codes can be told apart by: the palette's, plus those of stored
   * colours outside it (black, say), which only the codes storing that colour use (up to four each).
   * Overflow means more codes than this; it is what an overflow warning should quote.
   */
  pairs: number;
}

/**
 * Gives every code a colour and a mark, in the order given (codebook order, so the result is the same
 * for everyone). A code keeps its stored colour when it has one and takes the first mark not yet used
 * with that colour; when all marks of its colour are taken it moves to the palette colour with the
 * fewest codes, so no two codes share colour-and-mark until every palette pair is used. Past that,
 * pairs repeat and `overflow` is set so the screen can say so.
 */
export function assignMarks(codes: ReadonlyArray<{ id: string; colour?: string | undefined }>): MarkAssignment {
  const marks = new Map<string, CodeMark>();
  const used = new Map<string, Set<Mark>>();
  const key = (hex: string) => hex.toUpperCase();
  const usedOf = (hex: string) => {
    let s = used.get(key(hex));
    if (!s) used.set(key(hex), (s = new Set()));
    return s;
  };
  let n = 0;
  let shared = false;
  for (const c of codes) {
    if (marks.has(c.id)) continue;
    const preferred = c.colour && isHexColour(c.colour) ? c.colour : ASSIGNABLE[n % ASSIGNABLE.length]!;
    n++;
    let hex = preferred;
    let free = MARKS.find((m) => !usedOf(hex).has(m));
    if (!free) {
      // the palette colour with the fewest codes so far (first in palette order on a tie)
      const open = ASSIGNABLE.map((h) => ({ h, count: usedOf(h).size })).filter((x) => x.count < MARKS.length).sort((a, b) => a.count - b.count)[0];
      if (open) {
        hex = open.h;
        free = MARKS.find((m) => !usedOf(hex).has(m));
      }
    }
    if (!free) {
      shared = true;
      marks.set(c.id, { hex: preferred, mark: MARKS[marks.size % MARKS.length]! });
      continue;
    }
    usedOf(hex).add(free);
    marks.set(c.id, { hex, mark: free });
  }
  const palette = new Set(ASSIGNABLE.map(key));
  let offPalette = 0;
  for (const [hex, taken] of used) if (!palette.has(hex)) offPalette += taken.size;
  return { marks, overflow: shared, pairs: DISTINCT_MARKS + offPalette };
}
