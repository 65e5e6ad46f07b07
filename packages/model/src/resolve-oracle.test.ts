/**
 * The one-walk resolver (resolve.ts) against the previous bulk resolver (resolve-by-item.ts) as the
 * oracle, which resolve.test.ts in turn checks against Yjs's own one-by-one resolution. Random
 * concurrent histories on several replicas with turns, formatting and embeds, anchors of every kind:
 * into live and deleted characters, at either side, into another type's items (a turn's map), the
 * type's start and end, clocks not received yet, malformed bytes; few anchors (the sorted-keys walk)
 * and many (the clock-table walk). Property-based testing against a reference implementation is
 * common practice (fast-check's documentation calls it "oracle" testing).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import { anchorAt } from './anchor.js';
import { resolveAnchorsByItem, resolveSegmentsByItem } from './resolve-by-item.js';
import { concatDecoded, decodeAnchors, resolveAnchors, resolveDecodedSegments, resolveSegments, segmentAnchors } from './resolve.js';
import { getText, getTurnsArray, newTextDoc } from './text-doc.js';
import type { SegmentRecord } from './layer-doc.js';

type Op =
  | { k: 'ins'; r: number; at: number; n: number }
  | { k: 'del'; r: number; at: number; n: number }
  | { k: 'fmt'; r: number; at: number; n: number }
  | { k: 'embed'; r: number; at: number }
  | { k: 'turn'; r: number; at: number }
  | { k: 'anchor'; r: number; at: number; assoc: 0 | -1 }
  | { k: 'sync'; from: number; to: number };

const opArb: fc.Arbitrary<Op> = fc.oneof(
  { weight: 4, arbitrary: fc.record({ k: fc.constant('ins' as const), r: fc.nat(3), at: fc.nat(), n: fc.oneof(fc.integer({ min: 1, max: 5 }), fc.integer({ min: 16, max: 40 })) }) },
  { weight: 3, arbitrary: fc.record({ k: fc.constant('del' as const), r: fc.nat(3), at: fc.nat(), n: fc.oneof(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 16, max: 30 })) }) },
  { weight: 1, arbitrary: fc.record({ k: fc.constant('fmt' as const), r: fc.nat(3), at: fc.nat(), n: fc.integer({ min: 1, max: 6 }) }) },
  { weight: 1, arbitrary: fc.record({ k: fc.constant('embed' as const), r: fc.nat(3), at: fc.nat() }) },
  { weight: 1, arbitrary: fc.record({ k: fc.constant('turn' as const), r: fc.nat(3), at: fc.nat() }) },
  { weight: 4, arbitrary: fc.record({ k: fc.constant('anchor' as const), r: fc.nat(3), at: fc.nat(), assoc: fc.constantFrom(0 as const, -1 as const) }) },
  { weight: 2, arbitrary: fc.record({ k: fc.constant('sync' as const), from: fc.nat(3), to: fc.nat(3) }) },
);

function sync(from: Y.Doc, to: Y.Doc): void {
  Y.applyUpdate(to, Y.encodeStateAsUpdate(from, Y.encodeStateVector(to)));
}

/** A history on `replicas` documents; returns the documents (not converged) and every anchor made. */
function history(replicas: number, initial: number, ops: Op[]): { docs: Y.Doc[]; anchors: Uint8Array[] } {
  const docs = Array.from({ length: replicas }, () => newTextDoc());
  getText(docs[0]!).insert(0, 'x'.repeat(initial));
  for (const d of docs.slice(1)) sync(docs[0]!, d);
  const anchors: Uint8Array[] = [];
  for (const op of ops) {
    if (op.k === 'sync') {
      sync(docs[op.from % replicas]!, docs[op.to % replicas]!);
      continue;
    }
    const doc = docs[op.r % replicas]!;
    const text = getText(doc);
    const len = text.length;
    if (op.k === 'ins') text.insert(op.at % (len + 1), 'abcdefghij'.repeat(4).slice(0, op.n));
    else if (op.k === 'del' && len > 0) text.delete(op.at % len, Math.min(op.n, len - (op.at % len)));
    else if (op.k === 'fmt' && len > 0) text.format(op.at % len, Math.min(op.n, len - (op.at % len)), { bold: true });
    else if (op.k === 'embed') text.insertEmbed(op.at % (len + 1), { image: 'x' });
    else if (op.k === 'turn') {
      const m = new Y.Map<unknown>();
      getTurnsArray(doc).push([m]);
      m.set('start', anchorAt(text, op.at % (len + 1), 0));
      // an anchor naming this map's own item: another type's item, never on the text's list
      anchors.push(Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(getTurnsArray(doc), 0)));
    } else if (op.k === 'anchor') anchors.push(anchorAt(text, op.at % (len + 1), op.assoc));
  }
  // the type's start and end, and malformed or truncated bytes
  anchors.push(Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(getText(docs[0]!), 0, 0)));
  anchors.push(Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(getText(docs[0]!), getText(docs[0]!).length, 0)));
  anchors.push(new Uint8Array([0, 0x80]), new Uint8Array([7]), new Uint8Array([0, 5]));
  return { docs, anchors };
}

/** An anchor naming each clock of each client the document has received, with assoc 0 and -1. */
function everyClock(doc: Y.Doc): Uint8Array[] {
  const out: Uint8Array[] = [];
  for (const [client, state] of Y.decodeStateVector(Y.encodeStateVector(doc))) {
    for (let clock = 0; clock < state; clock++) {
      for (const assoc of [0, -1]) out.push(Y.encodeRelativePosition(Y.createRelativePositionFromJSON({ item: { client, clock }, assoc })));
    }
  }
  return out;
}

describe('resolveAnchors (one walk) against the previous resolver', () => {
  it('gives the same index for every anchor on every replica, with few anchors and with many', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }), fc.integer({ min: 0, max: 60 }), fc.array(opArb, { minLength: 1, maxLength: 80 }), (replicas, initial, ops) => {
        const { docs, anchors } = history(replicas, initial, ops);
        // many: the same anchors repeated well past the table walk's threshold (256 item anchors), as fresh copies
        const many = Array.from({ length: Math.ceil(700 / anchors.length) }, () => anchors.map((a) => a.slice())).flat();
        // anchors read once and resolved against every replica (documents differ as a text after a correction does),
        // in two parts laid end to end as the text cache joins its layers
        const all: SegmentRecord[] = [];
        for (let i = 0; i + 1 < many.length; i += 2) all.push({ id: `s${i}`, codeId: 'c', start: many[i]!, end: many[i + 1]!, createdAt: i });
        const half = Math.floor(all.length / 2);
        const decoded = concatDecoded([decodeAnchors(segmentAnchors(all.slice(0, half))), decodeAnchors(segmentAnchors(all.slice(half)))]);
        for (const doc of docs) {
          expect(resolveDecodedSegments(doc, all, decoded, [])).toEqual(resolveSegmentsByItem(doc, all, []));
          expect(resolveAnchors(doc, anchors)).toEqual(resolveAnchorsByItem(doc, anchors));
          // every clock of every client, both sides: each character's first and last clock of every item,
          // deleted ones, other types' items, and clocks the previous resolution's kept table held
          const every = everyClock(doc);
          expect(resolveAnchors(doc, every)).toEqual(resolveAnchorsByItem(doc, every));
          expect(resolveAnchors(doc, many)).toEqual(resolveAnchorsByItem(doc, many));
          const segs: SegmentRecord[] = [];
          for (let i = 0; i + 1 < many.length; i += 2) segs.push({ id: `s${i}`, codeId: 'c', start: many[i]!, end: many[i + 1]!, createdAt: i });
          expect(resolveSegments(doc, segs)).toEqual(resolveSegmentsByItem(doc, segs));
          // the same list again (its anchors read once), then with segments' anchors swapped for others
          expect(resolveSegments(doc, segs)).toEqual(resolveSegmentsByItem(doc, segs));
          if (segs.length > 1) {
            segs[0] = { ...segs[0]!, end: segs[1]!.end };
            segs[segs.length - 1] = { ...segs[segs.length - 1]!, start: segs[0]!.start };
            expect(resolveSegments(doc, segs)).toEqual(resolveSegmentsByItem(doc, segs));
          }
          expect(resolveSegments(doc, segs.slice(0, 3))).toEqual(resolveSegmentsByItem(doc, segs.slice(0, 3)));
        }
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 80) },
    );
  }, 120_000); // a limit for a shared machine, not a timed assertion
});

describe('the clock table kept between resolutions', () => {
  it('holds nothing of an earlier document: clocks off the text resolve to null after a longer text', () => {
    // a long text fills table entries far past the second document's clocks
    const long = newTextDoc();
    getText(long).insert(0, 'y'.repeat(2_000));
    const first = everyClock(long);
    expect(resolveAnchors(long, first)).toEqual(resolveAnchorsByItem(long, first));
    // the second document's last clocks are a turn's map, never on its text's list
    const doc = newTextDoc();
    getText(doc).insert(0, 'z'.repeat(500));
    const m = new Y.Map<unknown>();
    getTurnsArray(doc).push([m]);
    m.set('start', anchorAt(getText(doc), 0, 0));
    const every = everyClock(doc);
    const got = resolveAnchors(doc, every);
    expect(got).toEqual(resolveAnchorsByItem(doc, every));
    expect(got.slice(-4)).toEqual([null, null, null, null]); // source: the map's clocks, as the oracle resolves them
  });
});
