/**
 * De-identification on the documents (DESIGN §8), pure: replacing identifiers with pseudonyms while
 * every segment stays on its words, and rebuilding a text document without its deleted content (the
 * purge) with every segment re-anchored to the rebuilt document at the same offsets.
 */
import * as Y from 'yjs';
import { anchorAt } from './anchor.js';
import { getSegmentsMap, listSegments } from './layer-doc.js';
import { resolveAnchors } from './resolve.js';
import { getText, getTurnsArray, newTextDoc } from './text-doc.js';

export interface Replacement {
  original: string;
  pseudonym: string;
}

/** One replacement at one place of the text: [start, end) becomes `insert`. */
export interface TextEdit {
  start: number;
  end: number;
  insert: string;
}

const WORD = /[\p{L}\p{N}]/u;

/**
 * Where each original occurs in `text` as whole words (not inside a longer word), longest originals
 * first so "Maria Lopez" wins over "Maria"; edits never overlap and come back in text order.
 */
export function planEdits(text: string, replacements: readonly Replacement[]): TextEdit[] {
  const taken: TextEdit[] = [];
  const sorted = [...replacements].filter((r) => r.original.length > 0).sort((a, b) => b.original.length - a.original.length);
  for (const r of sorted) {
    let from = 0;
    for (;;) {
      const at = text.indexOf(r.original, from);
      if (at < 0) break;
      const end = at + r.original.length;
      from = at + 1;
      if ((at > 0 && WORD.test(text[at - 1]!) && WORD.test(r.original[0]!)) || (end < text.length && WORD.test(text[end]!) && WORD.test(r.original.at(-1)!))) continue;
      if (taken.some((e) => at < e.end && end > e.start)) continue;
      taken.push({ start: at, end, insert: r.pseudonym });
    }
  }
  return taken.sort((a, b) => a.start - b.start);
}

/**
 * Where a segment boundary lands after `edits` (in text order): outside an edit it shifts with the
 * text; a start inside a replaced word moves to the pseudonym's start and an end inside one to the
 * pseudonym's end, so a segment that held the name holds the whole pseudonym.
 */
export function mapBoundary(offset: number, edits: readonly TextEdit[], side: 'start' | 'end'): number {
  let shift = 0;
  for (const e of edits) {
    const delta = e.insert.length - (e.end - e.start);
    if (side === 'start') {
      if (offset < e.start) break;
      if (offset >= e.end) shift += delta;
      else return e.start + shift;
    } else {
      if (offset <= e.start) break;
      if (offset >= e.end) shift += delta;
      else return e.start + shift + e.insert.length;
    }
  }
  return offset + shift;
}

interface Span { id: string; start: number; end: number }

/** Resolved [start, end) of every segment of a layer that resolves to a non-empty range. */
function spansOf(textDoc: Y.Doc, layer: Y.Doc, keepCollapsed = false): Span[] {
  const segs = listSegments(layer);
  const idx = resolveAnchors(textDoc, segs.flatMap((s) => [s.start, s.end]));
  const out: Span[] = [];
  segs.forEach((s, i) => {
    const a = idx[2 * i];
    const b = idx[2 * i + 1];
    if (a != null && b != null && (a < b || (keepCollapsed && a === b))) out.push({ id: s.id, start: a, end: b });
  });
  return out;
}

/** Sets a segment's anchors to [start, end) of `textDoc` when they do not resolve there already. */
function anchorSpans(textDoc: Y.Doc, layer: Y.Doc, spans: readonly Span[]): number {
  const text = getText(textDoc);
  const map = getSegmentsMap(layer);
  const now = spansOf(textDoc, layer);
  const current = new Map(now.map((s) => [s.id, s]));
  let moved = 0;
  layer.transact(() => {
    for (const s of spans) {
      const c = current.get(s.id);
      if (c && c.start === s.start && c.end === s.end) continue;
      const m = map.get(s.id);
      if (!m || s.end <= s.start || s.end > text.length) continue;
      m.set('start', anchorAt(text, s.start, 0));
      m.set('end', anchorAt(text, s.end, -1));
      moved++;
    }
  });
  return moved;
}

/**
 * Applies `edits` to the text document (each an ordinary delete then insert) and moves the anchors of
 * segments in `layers` that would otherwise lose or gain words: every segment keeps exactly its words,
 * with a replaced name inside it now its pseudonym. Returns how many segment anchors were rewritten.
 */
export function applyEdits(textDoc: Y.Doc, layers: readonly Y.Doc[], edits: readonly TextEdit[]): number {
  const before = layers.map((l) => spansOf(textDoc, l));
  const text = getText(textDoc);
  textDoc.transact(() => {
    // From the end, so earlier offsets stay valid.
    for (const e of [...edits].sort((a, b) => b.start - a.start)) {
      text.delete(e.start, e.end - e.start);
      text.insert(e.start, e.insert);
    }
  });
  let moved = 0;
  layers.forEach((layer, i) => {
    const expected = before[i]!.map((s) => ({ id: s.id, start: mapBoundary(s.start, edits, 'start'), end: mapBoundary(s.end, edits, 'end') }));
    moved += anchorSpans(textDoc, layer, expected);
  });
  return moved;
}

/**
 * A new text document holding only the current state of `old`: the same characters with the same
 * formatting, the same turns (their starts anchored anew), and no deleted content. Its items carry
 * a fresh client id, so nothing of the old document's history can merge into it.
 */
export function rebuildTextDoc(old: Y.Doc): Y.Doc {
  const fresh = newTextDoc();
  const oldText = getText(old);
  const turnMaps = getTurnsArray(old).toArray();
  const starts = resolveAnchors(old, turnMaps.map((m) => m.get('start') as Uint8Array));
  const text = getText(fresh);
  fresh.transact(() => {
    text.applyDelta(oldText.toDelta());
    const maps = turnMaps.map((m, i) => {
      const copy = new Y.Map<unknown>();
      for (const [k, v] of m.entries()) if (k !== 'start') copy.set(k, v instanceof Y.AbstractType ? v.toJSON() : v);
      copy.set('start', anchorAt(text, Math.min(starts[i] ?? 0, text.length), 0));
      return copy;
    });
    getTurnsArray(fresh).push(maps);
  });
  return fresh;
}

/** Moves every segment of `layer` from `oldText` to the same offsets of `newText` (quotes unchanged). */
export function reanchorLayer(oldText: Y.Doc, newText: Y.Doc, layer: Y.Doc): number {
  // Collapsed (orphaned) segments move too, as points, so they stay flagged rather than unresolvable.
  const spans = spansOf(oldText, layer, true);
  const text = getText(newText);
  const map = getSegmentsMap(layer);
  layer.transact(() => {
    for (const s of spans) {
      const m = map.get(s.id);
      if (!m) continue;
      m.set('start', anchorAt(text, s.start, 0));
      m.set('end', anchorAt(text, s.end, -1));
    }
  });
  return spans.length;
}
