import * as Y from 'yjs';
import { getText } from './text-doc.js';
import { decodeAnchor, type AnchorFields } from './anchor-codec.js';
import { turnsAt, type ResolvedTurn } from './turns.js';
import { getTurnsArray } from './text-doc.js';
import type { SegmentRecord } from './layer-doc.js';
import { segmentsAt, type ResolvedSegment } from './resolve.js';

/**
 * The previous bulk resolver (until issue 11's cold-resolution work), kept as the oracle that
 * resolve.property.test.ts checks `resolveAnchors`/`resolveSegments` against and as the reference of
 * `pnpm bench model` / `pnpm bench segments`. Not exported from the package.
 *
 * Bulk anchor resolution in one pass over the text's items (DESIGN §2: one-by-one
 * `createAbsolutePositionFromRelativePosition` walks left from every anchor, which is quadratic-ish).
 *
 * 1. Each anchor's item is found by binary search in the struct store (per-client clock order).
 * 2. One walk over the text's item list gives each needed item the count of visible characters before it.
 * 3. An anchor's index is then computed exactly as Yjs does with followUndoneDeletions = false:
 *    a deleted target resolves to where it stood; a live one to its offset (+1 when assoc < 0).
 */

// Decoding and locating an anchor's item cost more than the walk itself, so both are cached on the
// anchor (the Uint8Array values read from a layer stay the same objects until the segment changes).
// The cache is a symbol-keyed property: invisible to encoders, JSON and Object.keys, and much cheaper
// to read than a WeakMap lookup, which mattered at 20,000 anchors. A cached item is re-checked
// before use: an item split by a later edit keeps its object but may no longer hold the clock.
interface Located {
  f: AnchorFields;
  store: unknown;
  item: Y.Item | null | undefined;
}
const CACHE = Symbol('gloss.anchor.by-item');
type Cached = Uint8Array & { [CACHE]?: Located };

interface StoreLike {
  clients: Map<number, Array<Y.Item | Y.GC>>;
}

/** The text item an anchor names: null = the anchor names the type's start/end; undefined = not resolvable here. */
function locate(anchor: Uint8Array, textDoc: Y.Doc, text: Y.Text): Located {
  let c = (anchor as Cached)[CACHE];
  const store = textDoc.store;
  if (c !== undefined && c.store === store) {
    const it = c.item;
    if (it === null || (it !== undefined && it.id.clock <= c.f.clock && c.f.clock < it.id.clock + it.length)) return c;
  }
  let f: AnchorFields;
  try {
    f = c?.f ?? decodeAnchor(anchor);
  } catch {
    // bytes from a misbehaving peer: the segment shows as unresolved rather than failing every resolution
    return { f: { client: null, clock: 0, assoc: 0, tname: null }, store, item: undefined };
  }
  let item: Y.Item | null | undefined;
  if (f.client === null) {
    item = f.tname !== null && (textDoc.share.get(f.tname) as unknown) === text ? null : undefined;
  } else {
    const structs = (store as unknown as StoreLike).clients.get(f.client);
    const last = structs?.[structs.length - 1];
    if (structs === undefined || last === undefined || last.id.clock + last.length <= f.clock) item = undefined; // not received yet
    else {
      const struct = structs[Y.findIndexSS(structs as never, f.clock)]!;
      item = struct instanceof Y.Item && struct.parent === text ? struct : undefined;
    }
  }
  if (item === undefined) return { f, store, item }; // may become resolvable later: not cached
  c = { f, store, item };
  // plain assignment: defineProperty cost ~0.4 µs per anchor here; symbol keys stay out of JSON and Object.keys
  if (Object.isExtensible(anchor)) (anchor as Cached)[CACHE] = c;
  return c;
}

/** Resolve many anchors against one text document; null where an anchor cannot be resolved here. */
export function resolveAnchorsByItem(textDoc: Y.Doc, anchors: readonly Uint8Array[]): Array<number | null> {
  const text = getText(textDoc);
  const n = anchors.length;
  const located: Located[] = new Array(n);
  const offsets = new Map<Y.Item, number>();
  for (let i = 0; i < n; i++) {
    const l = locate(anchors[i]!, textDoc, text);
    located[i] = l;
    if (l.item) offsets.set(l.item, -1);
  }
  if (offsets.size > 0) {
    let pos = 0;
    let remaining = offsets.size;
    for (let it = text._start; it !== null && remaining > 0; it = it.right) {
      if (offsets.get(it) === -1) {
        offsets.set(it, pos);
        remaining--;
      }
      if (!it.deleted && it.countable) pos += it.length;
    }
  }
  const out: Array<number | null> = new Array(n);
  const length = text.length;
  for (let i = 0; i < n; i++) {
    const { f, item } = located[i]!;
    if (item === undefined) out[i] = null;
    else if (item === null) out[i] = f.assoc >= 0 ? length : 0; // the start or end of the text itself
    else {
      const before = offsets.get(item)!;
      out[i] = item.deleted || !item.countable ? before : before + (f.clock - item.id.clock) + (f.assoc >= 0 ? 0 : 1);
    }
  }
  return out;
}

/** Resolve segments (from `listSegments`) against their text document in one pass. */
export function resolveSegmentsByItem(textDoc: Y.Doc, segments: readonly SegmentRecord[], turns?: readonly ResolvedTurn[]): ResolvedSegment[] {
  const anchors: Uint8Array[] = new Array(segments.length * 2);
  segments.forEach((s, i) => {
    anchors[2 * i] = s.start;
    anchors[2 * i + 1] = s.end;
  });
  const idx = resolveAnchorsByItem(textDoc, anchors);
  const str = getText(textDoc).toString();
  const maps = getTurnsArray(textDoc).toArray();
  const turnList = turns ?? turnsAt(maps, resolveAnchorsByItem(textDoc, maps.map((m) => m.get('start') as Uint8Array)), getText(textDoc).length);
  return segmentsAt(segments, idx, str, turnList);
}
