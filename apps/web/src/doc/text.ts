/**
 * Reads a text document's transcript (root Y.Text "text") as speaker turns: one turn per line.
 * A line's speaker and start time come from the text's formatting attributes (`speaker`, `startMs`)
 * when the importer set them.
 */
import * as Y from 'yjs';

export interface Turn {
  index: number;
  /** Offset of the turn's first character in the whole text. */
  start: number;
  /** Offset just past the turn's last character (the newline is not part of the turn). */
  end: number;
  text: string;
  speaker: string | null;
  startMs: number | null;
}

export const transcriptOf = (doc: Y.Doc): Y.Text => doc.getText('text');

export function readTurns(ytext: Y.Text): Turn[] {
  const turns: Turn[] = [];
  let offset = 0;
  let cur: Turn = { index: 0, start: 0, end: 0, text: '', speaker: null, startMs: null };
  const parts: string[] = [];
  const flush = () => {
    cur.text = parts.join('');
    cur.end = cur.start + cur.text.length;
    turns.push(cur);
    parts.length = 0;
  };
  for (const op of ytext.toDelta() as Array<{ insert: unknown; attributes?: Record<string, unknown> }>) {
    if (typeof op.insert !== 'string') continue;
    const a = op.attributes ?? {};
    const lines = op.insert.split('\n');
    lines.forEach((line, i) => {
      if (i > 0) {
        flush();
        offset += 1; // the newline
        cur = { index: turns.length, start: offset, end: offset, text: '', speaker: null, startMs: null };
      }
      if (line.length > 0) {
        if (cur.speaker === null && typeof a.speaker === 'string') cur.speaker = a.speaker;
        if (cur.startMs === null && typeof a.startMs === 'number') cur.startMs = a.startMs;
        parts.push(line);
        offset += line.length;
      }
    });
  }
  flush();
  return turns;
}

export function formatTime(ms: number): string {
  const s = Math.floor(ms / 1000);
  const hh = Math.floor(s / 3600);
  const mm = Math.floor((s % 3600) / 60);
  const ss = s % 60;
  const two = (n: number) => String(n).padStart(2, '0');
  return hh > 0 ? `${hh}:${two(mm)}:${two(ss)}` : `${two(mm)}:${two(ss)}`;
}
