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
