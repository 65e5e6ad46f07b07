/**
 * Each retrieved segment in its context: the words of its speaker turn before and after it (up to
 * `span` characters each side), read from the text documents' current state.
 */
import { readText, readTurns, turnIndexAt } from '@gloss/model';
import { withDocs, type DocLoader } from '../projection/load-doc.js';

export interface InContext {
  before: string;
  after: string;
  /** Whether the shown context was cut short of the turn's edges. */
  clippedBefore: boolean;
  clippedAfter: boolean;
}

export async function contexts(store: DocLoader, textDocIds: Map<string, string>, items: Array<{ key: string; textId: string; start: number; end: number }>, span = 300): Promise<Map<string, InContext>> {
  const out = new Map<string, InContext>();
  const byText = new Map<string, typeof items>();
  for (const i of items) byText.set(i.textId, [...(byText.get(i.textId) ?? []), i]);
  for (const [textId, list] of byText) {
    const docId = textDocIds.get(textId);
    if (!docId) continue;
    await withDocs(store, [docId], ([doc]) => {
      const s = readText(doc!);
      const turns = readTurns(doc!);
      for (const i of list) {
        const a = turns[turnIndexAt(turns, i.start)];
        const b = turns[turnIndexAt(turns, Math.max(i.start, i.end - 1))];
        const from = a ? a.start : 0;
        const to = b ? b.end : s.length;
        const beforeStart = Math.max(from, i.start - span);
        const afterEnd = Math.min(to, i.end + span);
        out.set(i.key, {
          before: s.slice(beforeStart, i.start),
          after: s.slice(i.end, afterEnd).replace(/\n$/, ''),
          clippedBefore: beforeStart > from,
          clippedAfter: afterEnd < to,
        });
      }
    });
  }
  return out;
}
