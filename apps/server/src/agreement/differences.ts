/**
 * Reflexive mode (DESIGN §5): no coefficient; where coders coded a unit differently, their codes side
 * by side, as prompts for discussion. Characters and free spans are shown by speaker turn.
 */
import type { TextInput } from './data.js';

export interface Difference {
  textId: string;
  start: number;
  end: number;
  quote: string;
  /** Every coder with a layer on the text, with the codes they applied to this unit (maybe none). */
  byCoder: Array<{ coderId: string; codeIds: string[] }>;
}

export function differences(texts: readonly TextInput[], codes: readonly string[], coders: readonly string[]): Difference[] {
  const wanted = new Set(codes);
  const out: Difference[] = [];
  for (const t of texts) {
    const present = coders.filter((c) => t.coders.includes(c));
    if (present.length < 2) continue;
    for (const u of t.units ?? []) {
      const byCoder = present.map((coderId) => ({
        coderId,
        codeIds: [
          ...new Set(
            t.segments
              .filter((s) => s.coderId === coderId && wanted.has(s.codeId) && s.start < u.end && u.start < s.end)
              .map((s) => s.codeId),
          ),
        ].sort(),
      }));
      const first = byCoder[0]!.codeIds.join('\u0000');
      if (byCoder.some((b) => b.codeIds.join('\u0000') !== first)) {
        out.push({ textId: t.textId, start: u.start, end: u.end, quote: t.text.slice(u.start, u.end), byCoder });
      }
    }
  }
  return out;
}
