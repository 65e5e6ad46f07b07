/**
 * The progress board of a round (issue 8): per participant and text, the words read (those of the
 * speaker turns that have been on their screen in the round's coding view, as their browser reports),
 * the words their segments cover, the number of segments and their "done" mark. Counts only — never
 * which codes or where — so the lead can watch a round's independent phase without seeing anyone's coding.
 */
import { type Db, type RoundRow, documents } from '@gloss/db';
import { listSegments, readTurns, resolveSegments } from '@gloss/model';
import { and, eq } from 'drizzle-orm';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import { doneMarks, readingMarks, roundLayers, type RoundMembers } from './records.js';

export interface ProgressRow {
  participantId: string;
  name: string;
  textId: string;
  title: string;
  words: number;
  wordsRead: number;
  wordsCoded: number;
  segments: number;
  done: boolean;
  doneAt: string | null;
}

/** Words (runs of non-space) with at least one character inside one of the ranges. */
export function wordsCovered(text: string, ranges: ReadonlyArray<{ start: number; end: number }>): number {
  const merged = [...ranges].filter((r) => r.end > r.start).sort((a, b) => a.start - b.start);
  let n = 0;
  let i = 0;
  const re = /\S+/g;
  for (let m = re.exec(text); m; m = re.exec(text)) {
    const s = m.index;
    const e = s + m[0].length;
    while (i < merged.length && merged[i]!.end <= s) i++;
    // ranges are sorted by start; any range starting before e and ending after s covers part of the word
    for (let j = i; j < merged.length && merged[j]!.start < e; j++) {
      if (merged[j]!.end > s) {
        n++;
        break;
      }
    }
  }
  return n;
}

/** Rows for every participant (or only `onlyUserId`) and text of the round. */
export async function roundProgress(db: Db, store: DocLoader, round: RoundRow, members: RoundMembers, onlyUserId: string | null): Promise<ProgressRow[]> {
  const layers = await roundLayers(db, round.id);
  const marks = await doneMarks(db, round.id);
  const reading = await readingMarks(db, round.id);
  const people = members.participants.filter((p) => onlyUserId === null || p.id === onlyUserId);
  const rows: ProgressRow[] = [];
  for (const t of members.texts) {
    const [textDoc] = await db.select({ id: documents.id }).from(documents).where(and(eq(documents.textId, t.id), eq(documents.kind, 'text')));
    if (!textDoc) continue;
    const mine = people.map((p) => ({ p, layer: layers.find((l) => l.textId === t.id && l.coderId === p.id) }));
    const ids = [textDoc.id, ...mine.filter((x) => x.layer).map((x) => x.layer!.id)];
    await withDocs(store, ids, ([text, ...layerDocs]) => {
      const content = text!.getText('text').toString();
      const turns = readTurns(text!);
      let k = 0;
      for (const { p, layer } of mine) {
        const resolved = layer ? resolveSegments(text!, listSegments(layerDocs[k++]!), turns).filter((s) => !s.unresolved) : [];
        const mark = marks.find((d) => d.textId === t.id && d.userId === p.id);
        rows.push({
          participantId: p.id,
          name: p.name,
          textId: t.id,
          title: t.title,
          words: t.wordCount,
          wordsRead: reading.find((r) => r.textId === t.id && r.userId === p.id)?.wordsRead ?? 0,
          wordsCoded: wordsCovered(content, resolved),
          segments: resolved.length,
          done: mark !== undefined,
          doneAt: mark ? mark.doneAt.toISOString() : null,
        });
      }
    });
  }
  return rows;
}
