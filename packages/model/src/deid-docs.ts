/**
 * De-identification beyond the transcript (DESIGN §8), pure: every string a study's other documents
 * hold — the codebook (definitions, inclusion and exclusion, example and near-miss quotes, the change
 * log), the memos and jottings and their replies, segment notes in layers — is found and rewritten
 * with the same whole-word replacements as the texts (`planEdits`), and a document is rebuilt from its
 * current state alone, without deleted content or any of its old client ids (the purge).
 *
 * The walk is generic over every root of a document, so a root or field added later is covered
 * without a list to keep up to date. Map keys are ids and are not rewritten; `start`/`end` values are
 * anchors (bytes, or base64 of bytes), and the fields that hold ids or fixed vocabularies (`id`,
 * `author`, `codeId`, `kind`, `status`…) are never words: both are left alone (NOT_WORDS).
 */
import * as Y from 'yjs';
import { fromBase64, toBase64 } from 'lib0/buffer';
import { anchorAt, resolveAnchor } from './anchor.js';
import { mapBoundary, planEdits, type Replacement, type TextEdit } from './deid.js';
import { getText } from './text-doc.js';

/** Keys whose values are anchors (RelativePositions as bytes or base64), ids or fixed vocabularies, never words. */
const ANCHOR_KEYS = new Set([
  'start', 'end',
  'id', 'by', 'author', 'createdBy', 'codeId', 'codeIds', 'textId', 'segmentId', 'parentId', 'mergedInto', 'splitInto',
  'replyTo', 'caseId', 'attributeId', 'kind', 'type', 'status', 'colour', 'field', 'decidedBy',
]);

/**
 * A whole string shaped like an account or database id (a UUID) is never words, whatever its key: the
 * finder's phone rule matched "4453-9646" inside one (a lead's id under a proposal's decider), and
 * replacing there would break the id.
 */
const ID_SHAPED = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const isIdShaped = (s: string) => s.length === 36 && ID_SHAPED.test(s);

type Root = Y.Map<unknown> | Y.Array<unknown> | Y.Text;

/**
 * Every non-empty root of `doc`, typed. A document built by applyUpdate alone has its roots as
 * generic types until someone asks for them by type: a root holding keyed entries is a map, one whose
 * items are characters or formatting is a text, anything else in sequence is an array.
 */
export function docRoots(doc: Y.Doc): Array<{ name: string; type: Root }> {
  const out: Array<{ name: string; type: Root }> = [];
  for (const [name, t] of [...doc.share.entries()]) {
    if (t instanceof Y.Map || t instanceof Y.Array || t instanceof Y.Text) {
      out.push({ name, type: t as Root });
      continue;
    }
    if (t._map.size > 0) {
      out.push({ name, type: doc.getMap(name) });
      continue;
    }
    let textual = false;
    let any = false;
    for (let item = t._start; item !== null; item = item.right) {
      any = true;
      if (item.content instanceof Y.ContentString || item.content instanceof Y.ContentFormat || item.content instanceof Y.ContentEmbed) textual = true;
    }
    if (any) out.push({ name, type: textual ? doc.getText(name) : doc.getArray(name) });
  }
  return out;
}

/** A string found in a document, with where it is (root and keys, joined by dots). */
export interface DocString {
  path: string;
  text: string;
}

function walkPlain(value: unknown, path: string, out: DocString[]): void {
  if (typeof value === 'string') {
    if (value.length > 0 && !isIdShaped(value)) out.push({ path, text: value });
  } else if (Array.isArray(value)) value.forEach((v, i) => walkPlain(v, `${path}.${i}`, out));
  else if (value !== null && typeof value === 'object' && !(value instanceof Uint8Array)) {
    for (const [k, v] of Object.entries(value)) if (!ANCHOR_KEYS.has(k)) walkPlain(v, `${path}.${k}`, out);
  }
}

function walkType(value: unknown, path: string, out: DocString[]): void {
  if (value instanceof Y.Text) {
    const s = value.toString();
    if (s.length > 0) out.push({ path, text: s });
  } else if (value instanceof Y.Map) {
    for (const [k, v] of value.entries()) if (!ANCHOR_KEYS.has(k)) walkType(v, `${path}.${k}`, out);
  } else if (value instanceof Y.Array) {
    value.toArray().forEach((v, i) => walkType(v, `${path}.${i}`, out));
  } else walkPlain(value, path, out);
}

/** Every string `doc` holds now (not its deleted content), for finding candidates in it. */
export function docStrings(doc: Y.Doc): DocString[] {
  const out: DocString[] = [];
  for (const { name, type } of docRoots(doc)) walkType(type, name, out);
  return out;
}

/** `s` with the replacements applied as whole words (longest first), and how many were made. */
export function replaceInString(s: string, replacements: readonly Replacement[]): { text: string; count: number } {
  const edits = planEdits(s, replacements);
  if (edits.length === 0) return { text: s, count: 0 };
  let text = s;
  for (const e of [...edits].reverse()) text = text.slice(0, e.start) + e.insert + text.slice(e.end);
  return { text, count: edits.length };
}

/**
 * A plain (JSON-like) value, such as an audit entry's detail, with its strings replaced: the same object
 * when nothing changed. Keys that name ids and anchors are left alone, as in documents.
 */
export function replaceInPlain(value: unknown, replacements: readonly Replacement[]): { value: unknown; count: number } {
  const tally = { n: 0 };
  const next = replacePlain(value, replacements, tally);
  return { value: next, count: tally.n };
}

function replacePlain(value: unknown, replacements: readonly Replacement[], tally: { n: number }): unknown {
  if (typeof value === 'string') {
    if (isIdShaped(value)) return value;
    const r = replaceInString(value, replacements);
    tally.n += r.count;
    return r.count > 0 ? r.text : value;
  }
  if (Array.isArray(value)) {
    let changed = false;
    const next = value.map((v) => {
      const w = replacePlain(v, replacements, tally);
      if (w !== v) changed = true;
      return w;
    });
    return changed ? next : value;
  }
  if (value !== null && typeof value === 'object' && !(value instanceof Uint8Array)) {
    let changed = false;
    const next: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      const w = ANCHOR_KEYS.has(k) ? v : replacePlain(v, replacements, tally);
      if (w !== v) changed = true;
      next[k] = w;
    }
    return changed ? next : value;
  }
  return value;
}

function replaceInType(type: unknown, replacements: readonly Replacement[], tally: { n: number }): void {
  if (type instanceof Y.Text) {
    const edits = planEdits(type.toString(), replacements);
    // From the end, so earlier offsets stay valid; the pseudonym keeps the formatting of the word it replaces.
    for (const e of [...edits].reverse()) {
      const attrs = formatAt(type, e.start);
      type.delete(e.start, e.end - e.start);
      type.insert(e.start, e.insert, attrs);
    }
    tally.n += edits.length;
  } else if (type instanceof Y.Map) {
    for (const [k, v] of [...type.entries()]) {
      if (ANCHOR_KEYS.has(k)) continue;
      if (v instanceof Y.AbstractType) replaceInType(v, replacements, tally);
      else {
        const w = replacePlain(v, replacements, tally);
        if (w !== v) type.set(k, w);
      }
    }
  } else if (type instanceof Y.Array) {
    const items = type.toArray();
    for (let i = items.length - 1; i >= 0; i--) {
      const v = items[i];
      if (v instanceof Y.AbstractType) replaceInType(v, replacements, tally);
      else {
        const w = replacePlain(v, replacements, tally);
        if (w !== v) {
          type.delete(i, 1);
          type.insert(i, [w]);
        }
      }
    }
  }
}

function formatAt(text: Y.Text, index: number): Record<string, unknown> | undefined {
  let at = 0;
  for (const op of text.toDelta() as Array<{ insert: unknown; attributes?: Record<string, unknown> }>) {
    const len = typeof op.insert === 'string' ? op.insert.length : 1;
    if (index < at + len) return op.attributes;
    at += len;
  }
  return undefined;
}

/**
 * Rewrites every string of `doc` (all roots, all depths) with the replacements, in one transaction, as
 * ordinary edits. Returns how many occurrences were replaced.
 */
export function replaceInDoc(doc: Y.Doc, replacements: readonly Replacement[]): number {
  const tally = { n: 0 };
  const roots = docRoots(doc);
  doc.transact(() => {
    for (const { type } of roots) replaceInType(type, replacements, tally);
  });
  return tally.n;
}

type DeltaOp = { insert: unknown; attributes?: Record<string, unknown> };
const copyDelta = (text: Y.Text): DeltaOp[] =>
  (text.toDelta() as DeltaOp[]).map((op) => ({ ...op, insert: op.insert instanceof Y.AbstractType ? copyValue(op.insert) : op.insert }));

function copyValue(value: unknown): unknown {
  if (value instanceof Y.Text) {
    const t = new Y.Text();
    t.applyDelta(copyDelta(value));
    return t;
  }
  if (value instanceof Y.Map) {
    const m = new Y.Map<unknown>();
    for (const [k, v] of value.entries()) m.set(k, copyValue(v));
    return m;
  }
  if (value instanceof Y.Array) {
    const a = new Y.Array<unknown>();
    a.push(value.toArray().map(copyValue));
    return a;
  }
  return value;
}

/**
 * A new document holding only the current state of `old`: the same roots, maps, arrays and texts
 * (with their formatting) and the same plain values, but none of the deleted content and none of
 * the old client ids, so no part of the old history can merge into it.
 */
export function rebuildDoc(old: Y.Doc): Y.Doc {
  const fresh = new Y.Doc({ gc: false });
  const roots = docRoots(old);
  fresh.transact(() => {
    for (const { name, type } of roots) {
      if (type instanceof Y.Text) {
        fresh.getText(name).applyDelta(copyDelta(type));
      } else if (type instanceof Y.Map) {
        const m = fresh.getMap<unknown>(name);
        for (const [k, v] of type.entries()) m.set(k, copyValue(v));
      } else {
        fresh.getArray<unknown>(name).push(type.toArray().map(copyValue));
      }
    }
  });
  return fresh;
}

/** Client ids that wrote any part of `doc`'s history (deleted content included). */
export function docClients(doc: Y.Doc): number[] {
  return [...Y.decodeStateVector(Y.encodeStateVector(doc)).keys()];
}

/** The client ids whose structs an update carries. */
export function updateClients(update: Uint8Array): Set<number> {
  const out = new Set<number>();
  for (const s of Y.decodeUpdate(update).structs) out.add(s.id.client);
  return out;
}

/** A text rebuilt by a purge: its document before and after, for moving anchors from one to the other. */
export interface TextMove {
  old: Y.Doc;
  fresh: Y.Doc;
}

function moveAnchor(move: TextMove, anchor: Uint8Array, assoc: 0 | -1): Uint8Array | null {
  const at = resolveAnchor(move.old, anchor);
  if (at === null) return null;
  const text = getText(move.fresh);
  return anchorAt(text, Math.min(at, text.length), assoc);
}

type Anchored = Record<string, unknown> & { textId: string };
const isAnchored = (v: unknown): v is Anchored =>
  v !== null && typeof v === 'object' && !(v instanceof Uint8Array) && !Array.isArray(v) &&
  typeof (v as Anchored).textId === 'string' && (v as Anchored).start !== undefined && (v as Anchored).end !== undefined;

const decodeAnchor = (v: unknown): Uint8Array => (typeof v === 'string' ? fromBase64(v) : (v as Uint8Array));
/** An anchor written back in the form it was found in (bytes in the codebook, base64 in memo attachments). */
const encodeLike = (like: unknown, a: Uint8Array): unknown => (typeof like === 'string' ? toBase64(a) : a);

/**
 * Visits every plain value that names a text and carries `start`/`end` anchors (examples, near-misses,
 * jotting passages), wherever it sits; a returned different value replaces it, as an ordinary edit.
 */
function eachAnchored(doc: Y.Doc, visit: (o: Anchored, path: string) => Anchored): void {
  const inType = (type: unknown, path: string): void => {
    if (type instanceof Y.Map) {
      for (const [k, v] of [...type.entries()]) {
        if (v instanceof Y.AbstractType) inType(v, `${path}.${k}`);
        else if (isAnchored(v)) {
          const w = visit(v, `${path}.${k}`);
          if (w !== v) type.set(k, w);
        }
      }
    } else if (type instanceof Y.Array) {
      const items = type.toArray();
      for (let i = items.length - 1; i >= 0; i--) {
        const v = items[i];
        if (v instanceof Y.AbstractType) inType(v, `${path}.${i}`);
        else if (isAnchored(v)) {
          const w = visit(v, `${path}.${i}`);
          if (w !== v) {
            type.delete(i, 1);
            type.insert(i, [w]);
          }
        }
      }
    }
  };
  const roots = docRoots(doc);
  doc.transact(() => {
    for (const { name, type } of roots) inType(type, name);
  });
}

/**
 * Moves the anchors that point into rebuilt texts — examples and near-misses in a codebook (bytes),
 * passages of jottings in a memos document (base64) — to the same offsets of the rebuilt texts, as
 * ordinary edits of `doc`. Anchors that no longer resolve are left as they were (their stored quote
 * stays). Returns how many anchored values moved.
 */
export function moveDocAnchors(doc: Y.Doc, moves: ReadonlyMap<string, TextMove>): number {
  let moved = 0;
  eachAnchored(doc, (o) => {
    const move = moves.get(o.textId);
    if (!move) return o;
    try {
      const s = moveAnchor(move, decodeAnchor(o.start), 0);
      const e = moveAnchor(move, decodeAnchor(o.end), -1);
      if (s === null || e === null) return o;
      moved++;
      return { ...o, start: encodeLike(o.start, s), end: encodeLike(o.end, e) };
    } catch {
      return o; // not an anchor after all
    }
  });
  return moved;
}

/** Where each anchored value of `doc` on text `textId` is now ([start, end) offsets), by its place in the document. */
export function captureAnchors(doc: Y.Doc, textId: string, textDoc: Y.Doc): Map<string, { start: number; end: number }> {
  const out = new Map<string, { start: number; end: number }>();
  eachAnchored(doc, (o, path) => {
    if (o.textId !== textId) return o;
    try {
      const s = resolveAnchor(textDoc, decodeAnchor(o.start));
      const e = resolveAnchor(textDoc, decodeAnchor(o.end));
      if (s !== null && e !== null && s < e) out.set(path, { start: s, end: e });
    } catch {
      // not an anchor after all
    }
    return o;
  });
  return out;
}

/**
 * After `edits` were applied to the text (model deid.ts `applyEdits`), anchors captured before them are
 * set again where their words are now — a boundary inside a replaced word moves to the pseudonym's
 * edge, as a segment's does — so an example or a jotting on "Dana Whitcombe" is on "[Person 1]".
 */
export function restoreAnchors(doc: Y.Doc, textId: string, textDoc: Y.Doc, captured: ReadonlyMap<string, { start: number; end: number }>, edits: readonly TextEdit[]): number {
  const text = getText(textDoc);
  let moved = 0;
  eachAnchored(doc, (o, path) => {
    const was = o.textId === textId ? captured.get(path) : undefined;
    if (!was) return o;
    const start = mapBoundary(was.start, edits, 'start');
    const end = mapBoundary(was.end, edits, 'end');
    const [s, e] = [resolveAnchor(textDoc, decodeAnchor(o.start)), resolveAnchor(textDoc, decodeAnchor(o.end))];
    if (s === start && e === end) return o;
    if (end <= start || end > text.length) return o;
    moved++;
    return { ...o, start: encodeLike(o.start, anchorAt(text, start, 0)), end: encodeLike(o.end, anchorAt(text, end, -1)) };
  });
  return moved;
}
