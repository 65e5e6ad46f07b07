import * as Y from 'yjs';
import { getText } from './text-doc.js';
import { readTurns, turnIndexAt, type ResolvedTurn } from './turns.js';
import type { SegmentRecord } from './layer-doc.js';

/**
 * Bulk anchor resolution in one pass over the text's items (DESIGN §2: one-by-one
 * `createAbsolutePositionFromRelativePosition` walks left from every anchor, which is quadratic-ish).
 *
 * 1. Each anchor's item is found by binary search in the struct store (per-client clock order).
 * 2. One walk over the text's item list gives each needed item the count of visible characters before it.
 * 3. An anchor's index is then computed exactly as Yjs does with followUndoneDeletions = false:
 *    a deleted target resolves to where it stood; a live one to its offset (+1 when assoc < 0).
 */

// Decoding is a measurable part of the cost; the Uint8Array values read from a layer are stable objects
// until the segment changes, so decoded positions are cached by identity.
const decoded = new WeakMap<Uint8Array, Y.RelativePosition>();
function decode(anchor: Uint8Array): Y.RelativePosition {
  let r = decoded.get(anchor);
  if (r === undefined) {
    r = Y.decodeRelativePosition(anchor);
    decoded.set(anchor, r);
  }
  return r;
}

interface StoreLike {
  clients: Map<number, Array<Y.Item | Y.GC>>;
}

/** Resolve many anchors against one text document; null where an anchor cannot be resolved here. */
export function resolveAnchors(textDoc: Y.Doc, anchors: readonly Uint8Array[]): Array<number | null> {
  const text = getText(textDoc);
  const store = textDoc.store as unknown as StoreLike;
  const rposList = anchors.map(decode);
  const targets: Array<Y.Item | null | undefined> = new Array(anchors.length);
  const offsets = new Map<Y.Item, number>();
  for (let i = 0; i < rposList.length; i++) {
    const id = rposList[i]!.item;
    if (id === null) {
      targets[i] = null;
      continue;
    }
    const structs = store.clients.get(id.client);
    const last = structs?.[structs.length - 1];
    if (structs === undefined || last === undefined || last.id.clock + last.length <= id.clock) {
      targets[i] = undefined; // not received yet
      continue;
    }
    const struct = structs[Y.findIndexSS(structs as never, id.clock)]!;
    if (!(struct instanceof Y.Item) || struct.parent !== text) {
      targets[i] = undefined;
      continue;
    }
    targets[i] = struct;
    offsets.set(struct, -1);
  }
  if (offsets.size > 0) {
    let pos = 0;
    let remaining = offsets.size;
    for (let n = text._start; n !== null && remaining > 0; n = n.right) {
      if (offsets.has(n)) {
        offsets.set(n, pos);
        remaining--;
      }
      if (!n.deleted && n.countable) pos += n.length;
    }
  }
  const out: Array<number | null> = new Array(anchors.length);
  const length = text.length;
  for (let i = 0; i < rposList.length; i++) {
    const rpos = rposList[i]!;
    const item = targets[i];
    if (item === undefined) {
      out[i] = null;
    } else if (item === null) {
      // No item: the anchor names the start or the end of the root type itself.
      const ours = rpos.tname !== null ? (textDoc.share.get(rpos.tname) as unknown) === text : false;
      out[i] = ours ? (rpos.assoc >= 0 ? length : 0) : null;
    } else {
      const before = offsets.get(item)!;
      out[i] = item.deleted || !item.countable ? before : before + (rpos.item!.clock - item.id.clock) + (rpos.assoc >= 0 ? 0 : 1);
    }
  }
  return out;
}

export interface ResolvedSegment {
  id: string;
  codeId: string;
  start: number;
  end: number;
  quote: string;
  /** Every character of the segment was deleted: it collapsed to a point. Never dropped. */
  orphaned: boolean;
  /** An anchor points at text this replica has not received yet (the layer arrived before the text). */
  unresolved: boolean;
  turn: { speaker: string | null; startMs: number | null } | null;
  createdAt: number;
}

/** Resolve segments (from `listSegments`) against their text document in one pass. */
export function resolveSegments(textDoc: Y.Doc, segments: readonly SegmentRecord[], turns?: readonly ResolvedTurn[]): ResolvedSegment[] {
  const anchors: Uint8Array[] = new Array(segments.length * 2);
  segments.forEach((s, i) => {
    anchors[2 * i] = s.start;
    anchors[2 * i + 1] = s.end;
  });
  const idx = resolveAnchors(textDoc, anchors);
  const str = getText(textDoc).toString();
  const turnList = turns ?? readTurns(textDoc);
  return segments.map((s, i) => {
    const a = idx[2 * i];
    const b = idx[2 * i + 1];
    if (a == null || b == null) {
      return { id: s.id, codeId: s.codeId, start: 0, end: 0, quote: '', orphaned: false, unresolved: true, turn: null, createdAt: s.createdAt };
    }
    // Concurrent moves can in principle cross the bounds; clamp so a range is never reversed.
    const start = Math.min(a, b);
    const end = b;
    const t = turnIndexAt(turnList, start);
    const turn = t < 0 ? null : { speaker: turnList[t]!.speaker, startMs: turnList[t]!.startMs };
    return { id: s.id, codeId: s.codeId, start, end, quote: str.slice(start, end), orphaned: start === end, unresolved: false, turn, createdAt: s.createdAt };
  });
}
