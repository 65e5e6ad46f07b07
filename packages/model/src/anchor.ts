import * as Y from 'yjs';
import { getText } from './text-doc.js';
import { InvalidRangeError } from './errors.js';

/**
 * Anchors are encoded Yjs RelativePositions into the text document's root `Y.Text`.
 * DESIGN §2: a segment's start sticks to its first character (assoc 0) and its end to its last
 * character (assoc -1), so text typed at either boundary stays outside the segment.
 */
export function anchorAt(text: Y.Text, index: number, assoc: 0 | -1): Uint8Array {
  return Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(text, index, assoc));
}

export interface RangeAnchors {
  start: Uint8Array;
  end: Uint8Array;
}

/** Anchors for the non-empty range [start, end) of the text document's current text. */
export function anchorRange(textDoc: Y.Doc, start: number, end: number): RangeAnchors {
  const text = getText(textDoc);
  checkRange(start, end, text.length);
  return { start: anchorAt(text, start, 0), end: anchorAt(text, end, -1) };
}

export function checkRange(start: number, end: number, length: number): void {
  if (!Number.isInteger(start) || !Number.isInteger(end)) throw new InvalidRangeError(`range bounds must be integers, got [${start}, ${end})`);
  if (start < 0 || end > length) throw new InvalidRangeError(`range [${start}, ${end}) is outside the text (length ${length})`);
  if (start >= end) throw new InvalidRangeError(`range [${start}, ${end}) is empty or reversed`);
}

/**
 * One anchor resolved the way Yjs does it, with followUndoneDeletions = false so every client agrees
 * (DESIGN §2). Returns null when the anchor points at content this replica has not received yet, or
 * into another type. This is the reference that the bulk resolver must match.
 */
export function resolveAnchor(textDoc: Y.Doc, anchor: Uint8Array): number | null {
  // Define the root as Y.Text first: in a doc built by applyUpdate alone the root is still a generic
  // type, and getText() afterwards would swap in a new instance that the resolved type can't equal.
  const text = getText(textDoc);
  let rpos: Y.RelativePosition;
  try {
    rpos = Y.decodeRelativePosition(anchor);
  } catch {
    return null; // malformed bytes resolve nowhere, as in the bulk resolver
  }
  const abs = Y.createAbsolutePositionFromRelativePosition(rpos, textDoc, false);
  if (abs === null || abs.type !== text) return null;
  return abs.index;
}
