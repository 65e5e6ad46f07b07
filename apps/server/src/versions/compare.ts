/**
 * Pure comparisons of a document's past state (a Yjs snapshot) with its current one. Documents are
 * gc:false, so the deleted text is still there to show (DESIGN §2).
 */
import { getCodes, getText, readText, readTurns, resolveSegments, listSegments, type CodeView, type ResolvedTurn } from '@gloss/model';
import * as Y from 'yjs';

export interface TextChange {
  /** Offset in the current text where the change sits. */
  at: number;
  text: string;
}

export interface TextComparison {
  added: TextChange[];
  removed: TextChange[];
  /** Whitespace-separated words in the added and removed passages. */
  wordsAdded: number;
  wordsRemoved: number;
}

const words = (s: string) => s.match(/\S+/g)?.length ?? 0;

/**
 * What changed in the root text since `past`: the CRDT's own record, not a guessed diff. Y.Text's
 * toDelta(snapshot, prevSnapshot) marks items absent from prevSnapshot as added and items deleted by
 * `snapshot` as removed (the attribution Yjs provides for version views).
 */
export function compareText(doc: Y.Doc, past: Y.Snapshot): TextComparison {
  const delta = getText(doc).toDelta(Y.snapshot(doc), past) as Array<{ insert: unknown; attributes?: { ychange?: { type: string } } }>;
  const added: TextChange[] = [];
  const removed: TextChange[] = [];
  let at = 0;
  for (const op of delta) {
    if (typeof op.insert !== 'string') continue;
    const kind = op.attributes?.ychange?.type;
    const list = kind === 'added' ? added : kind === 'removed' ? removed : null;
    if (list) {
      const prev = list[list.length - 1];
      // Neighbouring runs (split by formatting) are one passage.
      if (prev && prev.at + (list === added ? prev.text.length : 0) === at) prev.text += op.insert;
      else list.push({ at, text: op.insert });
    }
    if (kind !== 'removed') at += op.insert.length;
  }
  return { added, removed, wordsAdded: added.reduce((n, c) => n + words(c.text), 0), wordsRemoved: removed.reduce((n, c) => n + words(c.text), 0) };
}

export interface PastText {
  text: string;
  turns: ResolvedTurn[];
}

export function pastDoc(doc: Y.Doc, snapshot: Y.Snapshot): Y.Doc {
  return Y.createDocFromSnapshot(doc, snapshot, new Y.Doc({ gc: false }));
}

export function readPastText(past: Y.Doc): PastText {
  return { text: readText(past), turns: readTurns(past) };
}

export interface SegmentThenNow {
  id: string;
  coderId: string;
  codeId: string;
  then: { start: number; end: number; quote: string; orphaned: boolean };
  now: { start: number; end: number; quote: string; orphaned: boolean } | null;
}

/**
 * The current layers' segments as they stood on the past text (segments made after the version are
 * left out: they did not exist then), beside where they are now. Layers keep no history of their
 * own here, so a segment removed since the version is not shown.
 */
export function segmentsThenNow(
  pastText: Y.Doc,
  currentText: Y.Doc,
  layers: ReadonlyArray<{ coderId: string; doc: Y.Doc }>,
  versionAt: number,
): SegmentThenNow[] {
  const out: SegmentThenNow[] = [];
  const pastTurns = readTurns(pastText);
  const nowTurns = readTurns(currentText);
  for (const l of layers) {
    const records = listSegments(l.doc).filter((r) => r.createdAt <= versionAt);
    const then = resolveSegments(pastText, records, pastTurns);
    const now = resolveSegments(currentText, records, nowTurns);
    then.forEach((t, i) => {
      if (t.unresolved) return;
      const n = now[i]!;
      out.push({
        id: t.id,
        coderId: l.coderId,
        codeId: t.codeId,
        then: { start: t.start, end: t.end, quote: t.quote, orphaned: t.orphaned },
        now: n.unresolved ? null : { start: n.start, end: n.end, quote: n.quote, orphaned: n.orphaned },
      });
    });
  }
  return out.sort((a, b) => a.then.start - b.then.start || a.then.end - b.then.end);
}

const COMPARED = ['label', 'briefDefinition', 'fullDefinition', 'inclusion', 'exclusion', 'status', 'type', 'parentId', 'mergedInto', 'colour'] as const;

export interface CodebookComparison {
  added: Array<{ id: string; label: string }>;
  removed: Array<{ id: string; label: string }>;
  changed: Array<{ id: string; label: string; field: string; then: unknown; now: unknown }>;
}

export function pastCodes(past: Y.Doc): CodeView[] {
  return getCodes(past);
}

export function compareCodebook(past: Y.Doc, current: Y.Doc): CodebookComparison {
  const then = new Map(getCodes(past).map((c) => [c.id, c]));
  const now = new Map(getCodes(current).map((c) => [c.id, c]));
  const out: CodebookComparison = { added: [], removed: [], changed: [] };
  for (const [id, c] of now) if (!then.has(id)) out.added.push({ id, label: c.label });
  for (const [id, c] of then) {
    const n = now.get(id);
    if (!n) {
      out.removed.push({ id, label: c.label });
      continue;
    }
    for (const field of COMPARED) {
      if (c[field] !== n[field]) out.changed.push({ id, label: n.label, field, then: c[field], now: n[field] });
    }
  }
  return out;
}
