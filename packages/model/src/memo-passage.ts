/**
 * A jotting on words that are not a segment is anchored to those words the way a segment is
 * (DESIGN §2: start sticks to the first character, end to the last), so it stays on them while the
 * transcript is corrected. The anchors travel inside the memo's attachment as base64 text, which every
 * reader of attachments (projection, exports) can carry as plain JSON.
 */
import type * as Y from 'yjs';
import { fromBase64, toBase64 } from 'lib0/buffer';
import { anchorRange, resolveAnchor } from './anchor.js';
import type { MemoAttachment } from './memos-doc.js';

/** The attachment for the words [start, end) of a text (throws InvalidRangeError on an empty or outside range). */
export function passageAttachment(textDoc: Y.Doc, textId: string, start: number, end: number): MemoAttachment {
  const a = anchorRange(textDoc, start, end);
  return { kind: 'text', textId, start: toBase64(a.start), end: toBase64(a.end) };
}

/**
 * Where an attachment's passage is in the text now: [start, end) offsets, or null when the attachment
 * names no passage, is on another text, or its words are gone (deleted, or not yet received here).
 */
export function resolvePassage(textDoc: Y.Doc, textId: string, a: MemoAttachment): { start: number; end: number } | null {
  if (a.kind !== 'text' || a.textId !== textId || typeof a.start !== 'string' || typeof a.end !== 'string') return null;
  let s: number | null;
  let e: number | null;
  try {
    s = resolveAnchor(textDoc, fromBase64(a.start));
    e = resolveAnchor(textDoc, fromBase64(a.end));
  } catch {
    return null; // not base64: a malformed attachment resolves nowhere, like a malformed anchor
  }
  // the end anchor sticks to the last character (assoc -1), so it resolves just past it
  if (s === null || e === null || e <= s) return null;
  return { start: s, end: e };
}
