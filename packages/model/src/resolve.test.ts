import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import { newTextDoc, getText } from './text-doc.js';
import { anchorRange, resolveAnchor } from './anchor.js';
import { resolveSegments } from './resolve.js';
import type { SegmentRecord } from './layer-doc.js';

// Every character ever typed in a run is a distinct code point (CJK block, one UTF-16 unit each), so the
// oracle can tell which characters a segment held when it was made and which of them survive.
class Chars {
  private next = 0x4e00;
  take(n: number): string {
    let s = '';
    for (let i = 0; i < n; i++) s += String.fromCharCode(this.next++);
    return s;
  }
}

interface Seg {
  rec: SegmentRecord;
  /** The characters the segment covered when it was made, in order. */
  held: string;
  /** Characters typed at one of its boundaries while the boundary character was alive. */
  typedAtBoundary: string[];
}

type Op =
  | { k: 'ins'; r: number; at: number; n: number }
  | { k: 'del'; r: number; at: number; n: number }
  | { k: 'edge'; r: number; seg: number; end: boolean; n: number }
  | { k: 'seg'; r: number; at: number; n: number }
  | { k: 'sync'; from: number; to: number };

const opArb = (replicas: number): fc.Arbitrary<Op> =>
  fc.oneof(
    fc.record({ k: fc.constant('ins' as const), r: fc.nat(replicas - 1), at: fc.nat(), n: fc.integer({ min: 1, max: 4 }) }),
    fc.record({ k: fc.constant('del' as const), r: fc.nat(replicas - 1), at: fc.nat(), n: fc.integer({ min: 1, max: 6 }) }),
    fc.record({ k: fc.constant('edge' as const), r: fc.nat(replicas - 1), seg: fc.nat(), end: fc.boolean(), n: fc.integer({ min: 1, max: 3 }) }),
    fc.record({ k: fc.constant('seg' as const), r: fc.nat(replicas - 1), at: fc.nat(), n: fc.integer({ min: 1, max: 8 }) }),
    fc.record({ k: fc.constant('sync' as const), from: fc.nat(replicas - 1), to: fc.nat(replicas - 1) }),
  );

function sync(from: Y.Doc, to: Y.Doc): void {
  Y.applyUpdate(to, Y.encodeStateAsUpdate(from, Y.encodeStateVector(to)));
}

function run(replicaCount: number, initial: number, ops: Op[]) {
  const chars = new Chars();
  const docs = Array.from({ length: replicaCount }, () => newTextDoc());
  getText(docs[0]!).insert(0, chars.take(initial));
  for (const d of docs.slice(1)) sync(docs[0]!, d);
  const segs: Seg[] = [];
  let id = 0;
  for (const op of ops) {
    if (op.k === 'sync') {
      sync(docs[op.from]!, docs[op.to]!);
      continue;
    }
    const doc = docs[op.r]!;
    const text = getText(doc);
    const len = text.length;
    if (op.k === 'ins') {
      text.insert(op.at % (len + 1), chars.take(op.n));
    } else if (op.k === 'del' && len > 0) {
      const at = op.at % len;
      text.delete(at, Math.min(op.n, len - at));
    } else if (op.k === 'seg' && len > 0) {
      const at = op.at % len;
      const end = Math.min(len, at + op.n);
      const a = anchorRange(doc, at, end);
      segs.push({ rec: { id: `s${id++}`, codeId: 'c', start: a.start, end: a.end, createdAt: 0 }, held: text.toString().slice(at, end), typedAtBoundary: [] });
    } else if (op.k === 'edge' && segs.length > 0) {
      const seg = segs[op.seg % segs.length]!;
      const s = resolveAnchor(doc, seg.rec.start);
      const e = resolveAnchor(doc, seg.rec.end);
      if (s === null || e === null || s >= e) continue;
      const str = text.toString();
      // Only a boundary whose character is alive here is a boundary the typist can see.
      const boundaryChar = op.end ? seg.held[seg.held.length - 1]! : seg.held[0]!;
      if ((op.end ? str[e - 1] : str[s]) !== boundaryChar) continue;
      const typed = chars.take(op.n);
      text.insert(op.end ? e : s, typed);
      seg.typedAtBoundary.push(typed);
    }
  }
  // Converge: every replica sends to every other, twice, in a fixed order.
  for (let round = 0; round < 2; round++) for (const a of docs) for (const b of docs) if (a !== b) sync(a, b);
  return { docs, segs };
}

describe('resolveSegments (bulk, one pass)', () => {
  it('matches Yjs one-by-one resolution and the independent oracle after random concurrent edits', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 4 }),
        fc.integer({ min: 0, max: 40 }),
        fc.array(opArb(4), { minLength: 1, maxLength: 60 }),
        (replicaCount, initial, rawOps) => {
          const ops = rawOps.map((o) => (o.k === 'sync' ? { ...o, from: o.from % replicaCount, to: o.to % replicaCount } : { ...o, r: o.r % replicaCount }));
          const { docs, segs } = run(replicaCount, initial, ops);
          const final = getText(docs[0]!).toString();
          for (const d of docs) expect(getText(d).toString()).toBe(final);
          const reference = docs.map((d) => resolveSegments(d, segs.map((s) => s.rec)));
          for (let r = 0; r < docs.length; r++) {
            const bulk = reference[r]!;
            // 1. equal to Yjs's own resolution (followUndoneDeletions = false), anchor by anchor
            bulk.forEach((b, i) => {
              expect(b.start).toBe(resolveAnchor(docs[r]!, segs[i]!.rec.start));
              expect(b.end).toBe(resolveAnchor(docs[r]!, segs[i]!.rec.end));
            });
            // 2. every replica resolves the same offsets
            expect(bulk.map((b) => [b.start, b.end])).toEqual(reference[0]!.map((b) => [b.start, b.end]));
          }
          const alive = new Set(final);
          reference[0]!.forEach((b, i) => {
            const seg = segs[i]!;
            const survivors = [...seg.held].filter((c) => alive.has(c)).join('');
            const heldSet = new Set(seg.held);
            // 3. the segment still holds exactly its surviving characters, in order
            expect([...b.quote].filter((c) => heldSet.has(c)).join('')).toBe(survivors);
            // 4. all its text deleted (incl. text typed inside later) => orphaned, collapsed, kept
            expect(b.orphaned).toBe(b.quote.length === 0);
            if (survivors.length > 0) expect(b.orphaned).toBe(false);
            expect(b.unresolved).toBe(false);
            if (b.orphaned) expect(b.start).toBe(b.end);
            // 5. text typed at a boundary stays outside
            for (const typed of seg.typedAtBoundary) for (const c of typed) expect(b.quote.includes(c)).toBe(false);
            // 6. if nothing inside was deleted or typed, the quote is exactly the original words
            if (survivors === seg.held && b.quote.length === seg.held.length) expect(b.quote).toBe(seg.held);
          });
        },
      ),
      { numRuns: Number(process.env.FC_RUNS ?? 250) },
    );
  });

  it('an untouched segment quotes its words exactly after edits elsewhere', () => {
    const doc = newTextDoc();
    const text = getText(doc);
    text.insert(0, 'we moved to the coast when the mill closed');
    const at = text.toString().indexOf('the coast');
    const a = anchorRange(doc, at, at + 'the coast'.length);
    const seg: SegmentRecord = { id: 'x', codeId: 'c', start: a.start, end: a.end, createdAt: 0 };
    text.insert(0, 'Well, ');
    text.delete(text.length - 6, 6);
    text.insert(text.length, 'shut');
    const now = text.toString().indexOf('the coast');
    text.insert(now, '[');
    text.insert(now + 1 + 'the coast'.length, ']');
    const [r] = resolveSegments(doc, [seg]);
    expect(r!.quote).toBe('the coast');
    expect(text.toString()).toBe('Well, we moved to [the coast] when the mill shut');
  });

  it('treats malformed anchor bytes as unresolved instead of throwing', () => {
    const a = newTextDoc();
    getText(a).insert(0, 'hello');
    const good = anchorRange(a, 1, 3);
    const out = resolveSegments(a, [
      { id: 'bad', codeId: 'c', start: new Uint8Array([0, 0x80]), end: new Uint8Array([7]), createdAt: 0 },
      { id: 'ok', codeId: 'c', ...good, createdAt: 0 },
    ]);
    expect(out.map((r) => [r.id, r.unresolved, r.quote])).toEqual([['bad', true, ''], ['ok', false, 'el']]);
  });

  it('marks anchors into text this replica has not received as unresolved', () => {
    const a = newTextDoc();
    getText(a).insert(0, 'hello');
    const b = newTextDoc();
    const anchors = anchorRange(a, 1, 3);
    const [r] = resolveSegments(b, [{ id: 'x', codeId: 'c', ...anchors, createdAt: 0 }]);
    expect(r!.unresolved).toBe(true);
  });
});
