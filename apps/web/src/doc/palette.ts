/**
 * Colour-blind-safe palettes.
 * Codes: Okabe, M. & Ito, K. (2008) "Color Universal Design (CUD): How to make figures and presentations
 * that are friendly to colorblind people", the eight-colour set (black left out: it reads as text).
 * People (presence carets): Paul Tol's "bright" qualitative scheme (Tol 2021, "Colour Schemes", SRON technical note).
 */
export const OKABE_ITO = ['#E69F00', '#56B4E9', '#009E73', '#F0E442', '#0072B2', '#D55E00', '#CC79A7'] as const;
export const TOL_BRIGHT = ['#4477AA', '#EE6677', '#228833', '#CCBB44', '#66CCEE', '#AA3377', '#BBBBBB'] as const;

function hash(s: string): number {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return h >>> 0;
}

export function personColour(userId: string): string {
  return TOL_BRIGHT[hash(userId) % TOL_BRIGHT.length]!;
}

/** Black or white text, whichever has the higher contrast on the given background (WCAG relative luminance). */
export function inkOn(bg: string): string {
  const c = [1, 3, 5].map((i) => parseInt(bg.slice(i, i + 2), 16) / 255).map((v) => (v <= 0.03928 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4));
  const L = 0.2126 * c[0]! + 0.7152 * c[1]! + 0.0722 * c[2]!;
  return (L + 0.05) / 0.05 > 1.05 / (L + 0.05) ? '#000000' : '#ffffff';
}
