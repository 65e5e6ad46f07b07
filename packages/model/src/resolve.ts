import * as Y from 'yjs';
import { decodeAnchor, type AnchorFields } from './anchor-codec.js';
import { getText, getTurnsArray } from './text-doc.js';
import { turnIndexAt, turnsAt, type ResolvedTurn } from './turns.js';
import type { SegmentRecord } from './layer-doc.js';

/**
 * Bulk anchor resolution in one pass over the text's item list (DESIGN §2: one-by-one
 * `createAbsolutePositionFromRelativePosition` walks left from every anchor, which is quadratic-ish).
 *
 * 1. Each anchor's (client, clock, assoc) is read from its bytes into typed arrays (no object per anchor;
 *    `decodeAnchors`, which a caller may keep: `resolveDecodedSegments`).
 * 2. One walk over the text's items, in document order, counts the visible characters before each item.
 *    Many anchors: the walk fills, for every clock of an item of a client some anchor names, one value
 *    per item from which each of its clocks' offsets follows (tables as long as the clients' clocks,
 *    laid end to end in one Int32Array kept between resolutions), and each anchor then reads its entry.
 *    Few anchors: their keys are sorted and each item looks for its own by binary search, so the walk can
 *    stop once all are found.
 * 3. An anchor's index is computed exactly as Yjs does with followUndoneDeletions = false:
 *    a deleted target resolves to where it stood; a live one to its offset (+1 when assoc < 0).
 * An anchor naming an item of another type, a garbage-collected struct or a clock not received yet
 * resolves to null: such a clock is never met on the text's list.
 *
 * Why not find each anchor's item in the struct store by binary search (the previous version,
 * resolve-by-item.ts, kept as the oracle): each probe reads an Item scattered in memory, and 20,000
 * anchors x ~15 probes of cold cache lines were most of a cold resolution (cpu profile, issue 11); it
 * cached the item on each anchor, so only a warm resolution was fast.
 */

/** Below this many item anchors the sorted-keys walk (early exit) beats filling clock tables. */
const TABLE_FROM = 256;
/** Clock tables larger than this in total (entries) fall back to the sorted-keys walk. */
const TABLE_MAX = 1 << 24;
/** Clock tables up to this many entries (8 MB) are kept for the next resolution (`tableOf`). */
const TABLE_KEEP = 1 << 21;
/**
 * A live item's table entries hold `pos - clock0 + LIVE` (its first character's offset less its first
 * clock, so one value fills the whole item); a deleted item's `-(pos + 1)`; 0: not on the text's list.
 * Clocks stay below TABLE_MAX (2^24) and offsets below V8's longest string (2^29), so a live entry
 * is always in (0, 2^31).
 */
const LIVE = 1 << 30;
/** Items shorter than this are filled by a loop; longer ones by `TypedArray.fill` (a call costs more than a few writes). */
const FILL_CALL_FROM = 16;

const MALFORMED: AnchorFields = { client: null, clock: 0, assoc: 0, tname: null };

interface Walked {
  positions: Array<number | null>;
  /** `text.toString()` when asked for (gathered on the same walk), else ''. */
  str: string;
}

/** The anchors that name an item this document has received: their index among all anchors, client, clock, assoc < 0. */
interface Named {
  m: number;
  index: Int32Array;
  clients: Float64Array;
  clocks: Float64Array;
  /** Each anchor's entry in the clock tables laid end to end: its client's base + its clock. */
  slots: Int32Array;
  before: Uint8Array;
  /** Each named client's clock (state vector entry). */
  states: Map<number, number>;
  /** Each named client's first entry in the tables laid end to end (clients in order of first mention). */
  bases: Map<number, number>;
  /** Entries of all the tables: the sum of the named clients' clocks. */
  total: number;
}

/**
 * The clock tables' memory, zeroed over `[0, size)`. One buffer is kept between resolutions: a fresh
 * 0.8 MB array on every resolution of a 30,000-word text was a fault-in of new pages and garbage.
 * Resolution is synchronous, so no two callers ever hold it at once.
 */
let kept: Int32Array | null = null;
function tableOf(size: number): Int32Array {
  if (kept !== null && kept.length >= size) {
    kept.fill(0, 0, size);
    return kept;
  }
  const t = new Int32Array(size);
  if (size <= TABLE_KEEP) kept = t;
  return t;
}

/**
 * Anchors read from their bytes, apart from any document: what an anchor names does not change, so a
 * caller that resolves the same anchors again after the text changed (the segments route's text cache,
 * after a correction) reads their bytes once (`decodeAnchors`). For anchor i: kind 0 names an item
 * (client, clock, assoc < 0 in `before`), 1 the start or end of a root type (`ends`), 2 nothing
 * resolvable (malformed or truncated bytes).
 */
export interface DecodedAnchors {
  readonly n: number;
  readonly kind: Uint8Array;
  readonly clients: Float64Array;
  readonly clocks: Float64Array;
  readonly before: Uint8Array;
  /** For kind 1: the root type's name and whether the anchor stands at its end (assoc >= 0). */
  readonly ends: ReadonlyMap<number, { tname: string | null; end: boolean }>;
}

const ITEM = 0;
const TYPE = 1;
const NONE = 2;

/** Reads each anchor's (client, clock, assoc) from its bytes into typed arrays (no object per anchor). */
export function decodeAnchors(anchors: readonly Uint8Array[]): DecodedAnchors {
  const n = anchors.length;
  const kind = new Uint8Array(n);
  const clients = new Float64Array(n);
  const clocks = new Float64Array(n);
  const before = new Uint8Array(n);
  const ends = new Map<number, { tname: string | null; end: boolean }>();
  for (let i = 0; i < n; i++) {
    const anchor = anchors[i]!;
    if (anchor[0] === 0) {
      // tag 0 (an item id), read in place: varUint client, varUint clock, optional varInt assoc
      // (anchor-codec.ts reads the same layout into an object)
      let client = 0;
      let clock = 0;
      let p = 1;
      let r = 0x80;
      for (let mult = 1; r & 0x80; mult *= 128) {
        r = p < anchor.length ? anchor[p++]! : -1;
        if (r < 0) break;
        client += (r & 0x7f) * mult;
      }
      for (let mult = 1, more = r >= 0; more; mult *= 128) {
        r = p < anchor.length ? anchor[p++]! : -1;
        if (r < 0) break;
        clock += (r & 0x7f) * mult;
        more = (r & 0x80) !== 0;
      }
      if (r < 0) {
        kind[i] = NONE; // truncated bytes from a misbehaving peer: unresolved
        continue;
      }
      clients[i] = client;
      clocks[i] = clock;
      before[i] = p < anchor.length && (anchor[p]! & 0x40) !== 0 ? 1 : 0;
      continue;
    }
    let f: AnchorFields;
    try {
      f = decodeAnchor(anchor);
    } catch {
      f = MALFORMED; // bytes from a misbehaving peer: unresolved rather than failing every resolution
    }
    if (f === MALFORMED) kind[i] = NONE;
    else if (f.client === null) {
      kind[i] = TYPE;
      ends.set(i, { tname: f.tname, end: f.assoc >= 0 });
    } else {
      clients[i] = f.client;
      clocks[i] = f.clock;
      before[i] = f.assoc < 0 ? 1 : 0;
    }
  }
  return { n, kind, clients, clocks, before, ends };
}

/** Decoded anchors laid end to end (several layers' anchors resolved in one walk). */
export function concatDecoded(parts: readonly DecodedAnchors[]): DecodedAnchors {
  if (parts.length === 1) return parts[0]!;
  const n = parts.reduce((x, p) => x + p.n, 0);
  const out = { n, kind: new Uint8Array(n), clients: new Float64Array(n), clocks: new Float64Array(n), before: new Uint8Array(n), ends: new Map<number, { tname: string | null; end: boolean }>() };
  let at = 0;
  for (const p of parts) {
    out.kind.set(p.kind, at);
    out.clients.set(p.clients, at);
    out.clocks.set(p.clocks, at);
    out.before.set(p.before, at);
    for (const [i, e] of p.ends) out.ends.set(at + i, e);
    at += p.n;
  }
  return out;
}

function walk(textDoc: Y.Doc, d: DecodedAnchors, wantString: boolean): Walked {
  const text = getText(textDoc);
  const n = d.n;
  const positions: Array<number | null> = new Array<number | null>(n).fill(null);
  const a: Named = {
    m: 0, index: new Int32Array(n), clients: new Float64Array(n), clocks: new Float64Array(n), slots: new Int32Array(n), before: new Uint8Array(n),
    states: new Map(), bases: new Map(), total: 0,
  };
  for (const [i, e] of d.ends) {
    // the start or end of the text itself
    if (e.tname !== null && (textDoc.share.get(e.tname) as unknown) === text) positions[i] = e.end ? text.length : 0;
  }
  const { kind, clients, clocks, before } = d;
  let lastClient = -1;
  let lastState = 0;
  let lastBase = 0;
  for (let i = 0; i < n; i++) {
    if (kind[i] !== ITEM) continue;
    const client = clients[i]!;
    const clock = clocks[i]!;
    if (client !== lastClient) {
      // anchors of one layer mostly name one client: look it up only when it changes
      let state = a.states.get(client);
      if (state === undefined) {
        a.states.set(client, (state = Y.getState(textDoc.store, client)));
        a.bases.set(client, a.total);
        a.total += state;
      }
      lastClient = client;
      lastState = state;
      lastBase = a.bases.get(client)!;
    }
    if (clock >= lastState) continue; // not received yet
    a.index[a.m] = i;
    a.clients[a.m] = client;
    a.clocks[a.m] = clock;
    a.slots[a.m] = lastBase + clock;
    a.before[a.m] = before[i]!;
    a.m++;
  }
  if (a.m === 0 && !wantString) return { positions, str: '' };
  return a.m >= TABLE_FROM && a.total <= TABLE_MAX ? walkTables(text, positions, a, wantString) : walkSorted(text, positions, a, wantString);
}

/** Many anchors: one walk fills where each clock of the named clients stands; each anchor reads its entry. */
function walkTables(text: Y.Text, positions: Array<number | null>, a: Named, wantString: boolean): Walked {
  // the named clients' tables laid end to end in one buffer, each from its base (a.bases)
  const table = tableOf(a.total);
  let pos = 0;
  let str = '';
  let lastClient = -1;
  let base = -1;
  for (let it = text._start; it !== null; it = it.right) {
    const id = it.id;
    if (id.client !== lastClient) {
      lastClient = id.client;
      base = a.bases.get(lastClient) ?? -1;
    }
    const live = !it.deleted && it.countable;
    const len = it.length;
    if (base >= 0) {
      const c0 = id.clock;
      const v = live ? pos - c0 + LIVE : -(pos + 1);
      const from = base + c0;
      if (len < FILL_CALL_FROM) for (let j = from, to = from + len; j < to; j++) table[j] = v;

      else table.fill(v, from, from + len);
    }
    if (live) {
      pos += len;
      if (wantString && it.content instanceof Y.ContentString) str += it.content.str;
    }
  }
  const { slots, clocks, before, index } = a;
  for (let k = 0; k < a.m; k++) {
    const v = table[slots[k]!]!;
    if (v === 0) continue;
    positions[index[k]!] = v > 0 ? v - LIVE + clocks[k]! + before[k]! : -v - 1;
  }
  return { positions, str };
}

/**
 * Few anchors: sorted keys (clock * m + k per client; exact while clocks stay below 2^53 / m, far
 * beyond any document) and a binary search per item of a named client; stops once all are found.
 */
function walkSorted(text: Y.Text, positions: Array<number | null>, a: Named, wantString: boolean): Walked {
  const m = a.m;
  const lists = new Map<number, number[]>();
  for (let k = 0; k < m; k++) {
    let l = lists.get(a.clients[k]!);
    if (l === undefined) lists.set(a.clients[k]!, (l = []));
    l.push(a.clocks[k]! * m + k);
  }
  const sorted = new Map<number, Float64Array>();
  for (const [client, l] of lists) sorted.set(client, Float64Array.from(l).sort());
  let pos = 0;
  let str = '';
  let found = 0;
  let lastClient = -1;
  let keys: Float64Array | undefined;
  for (let it = text._start; it !== null; it = it.right) {
    if (found === m && !wantString) break;
    const id = it.id;
    if (id.client !== lastClient) {
      lastClient = id.client;
      keys = sorted.get(lastClient);
    }
    const live = !it.deleted && it.countable;
    if (keys !== undefined && found < m) {
      const lo = id.clock * m;
      const hi = (id.clock + it.length) * m;
      let x = 0;
      let y = keys.length;
      while (x < y) {
        const mid = (x + y) >>> 1;
        if (keys[mid]! < lo) x = mid + 1;
        else y = mid;
      }
      for (; x < keys.length && keys[x]! < hi; x++) {
        const key = keys[x]!;
        const clock = Math.floor(key / m);
        const k = key - clock * m;
        positions[a.index[k]!] = live ? pos + (clock - id.clock) + a.before[k]! : pos;
        found++;
      }
    }
    if (live) {
      pos += it.length;
      if (wantString && it.content instanceof Y.ContentString) str += it.content.str;
    }
  }
  return { positions, str };
}

/** Resolve many anchors against one text document; null where an anchor cannot be resolved here. */
export function resolveAnchors(textDoc: Y.Doc, anchors: readonly Uint8Array[]): Array<number | null> {
  return walk(textDoc, decodeAnchors(anchors), false).positions;
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

/**
 * The anchors last read for a list of segments, by the list: resolving the same list again (the same
 * records, the same anchor objects, as a warm resolution does) reads no bytes. Checked anchor by anchor
 * (same objects) before use; like the previous resolver's cache, it takes an anchor's bytes as never
 * written in place (they come from Yjs documents). A WeakMap: nothing outlives the list.
 */
const readFor = new WeakMap<readonly SegmentRecord[], { anchors: Uint8Array[]; decoded: DecodedAnchors }>();

function segmentsDecoded(segments: readonly SegmentRecord[]): DecodedAnchors {
  const kept = readFor.get(segments);
  if (kept !== undefined && kept.anchors.length === segments.length * 2) {
    const a = kept.anchors;
    let same = true;
    for (let i = 0; i < segments.length && same; i++) same = a[2 * i] === segments[i]!.start && a[2 * i + 1] === segments[i]!.end;
    if (same) return kept.decoded;
  }
  const anchors = segmentAnchors(segments);
  const decoded = decodeAnchors(anchors);
  readFor.set(segments, { anchors, decoded });
  return decoded;
}

/** Resolve segments (from `listSegments`) against their text document in one pass (turns and quotes from the same walk). */
export function resolveSegments(textDoc: Y.Doc, segments: readonly SegmentRecord[], turns?: readonly ResolvedTurn[]): ResolvedSegment[] {
  const turnMaps = turns ? [] : getTurnsArray(textDoc).toArray();
  const m = segments.length * 2;
  const decoded = segmentsDecoded(segments);
  const all = turnMaps.length === 0 ? decoded : concatDecoded([decoded, decodeAnchors(turnMaps.map((t) => t.get('start') as Uint8Array))]);
  const { positions: idx, str } = walk(textDoc, all, true);
  const turnList = turns ?? turnsAt(turnMaps, idx.slice(m), getText(textDoc).length);
  return segmentsAt(segments, idx, str, turnList);
}

/** The segments' anchors in the order `segmentsAt` reads their positions: start at 2i, end at 2i+1. */
export function segmentAnchors(segments: readonly SegmentRecord[]): Uint8Array[] {
  const anchors: Uint8Array[] = new Array(segments.length * 2);
  segments.forEach((s, i) => {
    anchors[2 * i] = s.start;
    anchors[2 * i + 1] = s.end;
  });
  return anchors;
}

/**
 * `resolveSegments` with the segments' anchors already read (`decodeAnchors(segmentAnchors(segments))`,
 * kept by the caller while the segments are the same) and the turns given (`[]`: none wanted).
 */
export function resolveDecodedSegments(textDoc: Y.Doc, segments: readonly SegmentRecord[], decoded: DecodedAnchors, turns: readonly ResolvedTurn[]): ResolvedSegment[] {
  if (decoded.n !== segments.length * 2) throw new RangeError('decoded anchors are not these segments\' anchors');
  const { positions: idx, str } = walk(textDoc, decoded, true);
  return segmentsAt(segments, idx, str, turns);
}

/**
 * Segments from their anchors' positions (start at 2i, end at 2i+1, null: not received yet), with
 * quotes from the text `str` and the turn each starts in. Shared with the previous resolver (the
 * oracle), whose anchor walk, not this shaping, is what the property test compares.
 */
export function segmentsAt(segments: readonly SegmentRecord[], idx: ReadonlyArray<number | null>, str: string, turnList: readonly ResolvedTurn[]): ResolvedSegment[] {
  // one `turn` object per turn, shared by the segments starting in it (read only), not one per segment
  const turnOf = turnList.map((t) => ({ speaker: t.speaker, startMs: t.startMs }));
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
    const turn = t < 0 ? null : turnOf[t]!;
    return { id: s.id, codeId: s.codeId, start, end, quote: str.slice(start, end), orphaned: start === end, unresolved: false, turn, createdAt: s.createdAt };
  });
}
