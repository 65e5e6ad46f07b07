/**
 * The segments route's JSON written from kept pieces (issue 11 item 4): each layer keeps its rows —
 * every resolved segment's JSON up to `"flags":`, sorted as the answer orders them — and a change
 * rebuilds the rows of the layers it touched only, reusing each unchanged segment's JSON (and its
 * quote's, when just its offsets moved). The answer is the layers' rows merged in order, each closed
 * with its flags. Byte for byte what `JSON.stringify(segmentsWithFlags(…))` writes: same fields in the
 * same order, same sort (text-cache.test.ts compares them after seeded random edits).
 */
import type { ResolvedSegment } from '@gloss/model';
import type { VisibleLayer } from '../http/text-layers.js';
import { cmp } from './with-flags.js';

export interface Row {
  id: string;
  codeId: string;
  start: number;
  end: number;
  quote: string;
  /** `{"id":…,"codeId":…,"start":` as UTF-8: the offsets follow. */
  head: Buffer;
  /** `,"quote":…,"flags":` as UTF-8: the flags and the closing brace follow. */
  tail: Buffer;
}

export interface LayerRows {
  /** The resolution these rows were made from (kept while it is the same object). */
  from: readonly ResolvedSegment[];
  layer: VisibleLayer;
  /** Ordered by start, end, id: the answer's order within one layer. */
  rows: Row[];
  byId: Map<string, Row>;
}

const J = JSON.stringify;

/** Rows of one layer from its resolution; `prev` (the same layer's earlier rows) lends what did not change. */
function layerRows(layer: VisibleLayer, resolved: readonly ResolvedSegment[], prev: LayerRows | null): LayerRows {
  const reuse = prev !== null && sameShape(prev.layer, layer) ? prev.byId : null;
  const middle = `,"coderId":${J(layer.coderId)},"layer":${J(layer.layerDocId)},"round":${J(layer.roundId ?? null)},"kind":${J(layer.coderId === null ? 'consensus' : 'coder')},"codeId":`;
  const byId = new Map<string, Row>();
  for (const s of resolved) {
    if (s.unresolved) continue; // names text this server has not stored: nothing true to say about it
    const old = reuse?.get(s.id);
    let row: Row;
    if (old !== undefined && old.start === s.start && old.end === s.end && old.codeId === s.codeId && old.quote === s.quote) row = old;
    else {
      // a correction elsewhere moves offsets only: the id, code and quote bytes stay
      const head = old !== undefined && old.codeId === s.codeId ? old.head : Buffer.from(`{"id":${J(s.id)}${middle}${J(s.codeId)},"start":`, 'utf8');
      const tail = old !== undefined && old.quote === s.quote ? old.tail : Buffer.from(`,"quote":${J(s.quote)},"flags":`, 'utf8');
      row = { id: s.id, codeId: s.codeId, start: s.start, end: s.end, quote: s.quote, head, tail };
    }
    byId.set(s.id, row);
  }
  // The records come ordered by id; the rows go by offsets. Laid out in the previous rows' order first
  // (new ones after), a change leaves them nearly sorted, which the sort (TimSort: runs) passes over in
  // about one comparison per row instead of a full sort of each touched layer on every change.
  let rows: Row[];
  if (reuse !== null) {
    rows = [];
    for (const old of prev!.rows) {
      const row = byId.get(old.id);
      if (row !== undefined) rows.push(row);
    }
    if (rows.length < byId.size) for (const row of byId.values()) if (!reuse.has(row.id)) rows.push(row);
  } else rows = [...byId.values()];
  let sorted = true;
  for (let i = 1; i < rows.length && sorted; i++) if (byOffsets(rows[i - 1]!, rows[i]!) > 0) sorted = false;
  if (!sorted) rows.sort(byOffsets);
  return { from: resolved, layer, rows, byId };
}

/** The layer's rows for this resolution: the kept ones while it is the same, else remade from them. */
export function rowsFor(prev: LayerRows | null, layer: VisibleLayer, resolved: readonly ResolvedSegment[]): LayerRows {
  return prev !== null && prev.from === resolved && sameShape(prev.layer, layer) ? prev : layerRows(layer, resolved, prev);
}

const sameShape = (a: VisibleLayer, b: VisibleLayer) => a.layerDocId === b.layerDocId && a.coderId === b.coderId && (a.roundId ?? null) === (b.roundId ?? null);

const byOffsets = (a: Row, b: Row) => a.start - b.start || a.end - b.end || cmp(a.id, b.id);


/** An answer as `joinRows` made it, with what the next join of the same view reuses. */
export interface Joined {
  body: Buffer<ArrayBuffer>;
  count: number;
  /** The rows in the answer's order, each with its flags' bytes. */
  picked: Row[];
  flags: Buffer[];
  /** Where each row's bytes begin in `body`. */
  starts: Int32Array;
}

/**
 * The answer as UTF-8: every layer's rows merged in the route's order (start, end, coder, layer, id),
 * each closed with its flags' JSON (`flagsOf` gives a layer's bytes, by segment id; absent: `[]`). Bytes,
 * written once into one buffer: on the 2-core bench machine first touching 4 MB of fresh memory cost
 * 30-100 ms (page faults), and a string answer paid it twice (the join, then the encoding when sent);
 * a kept answer is sent as it is.
 *
 * `prev`, the same view's previous answer, lends its bytes: the leading rows that are the same objects
 * with the same flag bytes (rows and flag buffers are never written after they are made, so the same
 * objects are the same bytes) are copied from it in one block, and so are the trailing ones; only the
 * rows between are written one by one. A correction changes the rows after it (their offsets moved), a
 * new segment one row: writing 40,000 small pieces was most of a join.
 */
export function joinRows(layers: readonly LayerRows[], flagsOf: (layerId: string) => ReadonlyMap<string, Buffer> | undefined, prev?: Joined | null): Joined {
  // Layers in the tie-break order of coder then layer id: within equal offsets the first layer wins.
  const order = [...layers].sort((a, b) => cmp(a.layer.coderId ?? '', b.layer.coderId ?? '') || cmp(a.layer.layerDocId, b.layer.layerDocId));
  const at = new Array<number>(order.length).fill(0);
  const flagMaps = order.map((l) => flagsOf(l.layer.layerDocId));
  const picked: Row[] = [];
  const flags: Buffer[] = [];
  const lens: number[] = [];
  for (;;) {
    let best = -1;
    let bestRow: Row | undefined;
    for (let k = 0; k < order.length; k++) {
      const r = order[k]!.rows[at[k]!];
      if (r === undefined) continue;
      // strictly smaller offsets only: a layer earlier in `order` wins ties, as the full sort's coder/layer keys say
      if (bestRow === undefined || r.start < bestRow.start || (r.start === bestRow.start && r.end < bestRow.end)) {
        best = k;
        bestRow = r;
      }
    }
    if (bestRow === undefined) break;
    const f = flagMaps[best]?.get(bestRow.id) ?? NO_FLAGS;
    picked.push(bestRow);
    flags.push(f);
    // the row's bytes, its closing brace included
    lens.push(bestRow.head.length + digits(bestRow.start) + END.length + digits(bestRow.end) + bestRow.tail.length + f.length + 1);
    at[best]!++;
  }
  const n = picked.length;
  // '[' rows joined by ',' ']'
  const starts = new Int32Array(n);
  let size = 1;
  for (let i = 0; i < n; i++) {
    starts[i] = size;
    size += lens[i]! + 1;
  }
  if (n === 0) size++;
  const body = Buffer.allocUnsafe(size);
  body[0] = 0x5b; // [
  body[size - 1] = 0x5d; // ]
  for (let i = 1; i < n; i++) body[starts[i]! - 1] = 0x2c; // ,

  // the rows shared with the previous answer at either end: the same objects, the same flag bytes
  const pn = prev?.count ?? 0;
  let head = 0;
  let tail = 0;
  if (prev) {
    const most = Math.min(n, pn);
    while (head < most && picked[head] === prev.picked[head] && flags[head] === prev.flags[head]) head++;
    while (tail < most - head && picked[n - 1 - tail] === prev.picked[pn - 1 - tail] && flags[n - 1 - tail] === prev.flags[pn - 1 - tail]) tail++;
    // rows 0..head-1 stand at the same offsets in both answers; rows and the commas between them copied at once
    if (head > 0) body.set(prev.body.subarray(1, starts[head - 1]! + lens[head - 1]!), 1);
    // the last `tail` rows, from the first of them to the previous answer's closing bracket
    if (tail > 0) body.set(prev.body.subarray(prev.starts[pn - tail]!, prev.body.length - 1), starts[n - tail]!);
  }
  for (let i = head; i < n - tail; i++) {
    const r = picked[i]!;
    // TypedArray set, not Buffer copy: the same bytes without copy()'s argument checks
    let p = starts[i]!;
    body.set(r.head, p);
    p = writeDigits(body, p + r.head.length, r.start);
    body.set(END, p);
    p = writeDigits(body, p + END.length, r.end);
    body.set(r.tail, p);
    p += r.tail.length;
    const f = flags[i]!;
    body.set(f, p);
    p += f.length;
    body[p] = 0x7d; // }
  }
  return { body, count: n, picked, flags, starts };
}

const END = Buffer.from(',"end":');
const NO_FLAGS = Buffer.from('[]');

/** Decimal digits of a non-negative integer (an offset), as JSON writes it. */
function digits(n: number): number {
  let d = 1;
  while (n >= 10) {
    n = Math.floor(n / 10);
    d++;
  }
  return d;
}

function writeDigits(buf: Buffer, at: number, n: number): number {
  const end = at + digits(n);
  let p = end;
  do {
    buf[--p] = 0x30 + (n % 10);
    n = Math.floor(n / 10);
  } while (n > 0);
  return end;
}
