import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import { anchorRange, resolveAnchor } from '../anchor.js';
import { getText, newTextDoc } from '../text-doc.js';
import { mapRange, type TextDelta } from './text-delta.js';

// The claim the incremental engine rests on: away from edit points, Yjs's own resolution moves an
// anchor exactly as mapRange maps its offset. Checked against Yjs (followUndoneDeletions = false).
describe('mapRange', () => {
  it('equals Yjs resolution for every untouched segment, after local and concurrent remote edits', () => {
    const edit = fc.record({ remote: fc.boolean(), sync: fc.boolean(), del: fc.boolean(), at: fc.nat(), n: fc.integer({ min: 1, max: 6 }) });
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.nat(), fc.integer({ min: 1, max: 8 })), { minLength: 1, maxLength: 12 }), fc.array(edit, { minLength: 1, maxLength: 8 }), (segSpec, edits) => {
        const doc = newTextDoc();
        const text = getText(doc);
        text.insert(0, 'abcdefghijklmnopqrstuvwxyz0123456789');
        const remote = new Y.Doc({ gc: false });
        Y.applyUpdate(remote, Y.encodeStateAsUpdate(doc));
        // some earlier deletions, so that anchors on deleted characters are in play
        text.delete(5, 3);
        Y.applyUpdate(remote, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(remote)));
        const segs = segSpec.map(([at, len]) => {
          const l = text.length;
          const s = at % (l - 1);
          return anchorRange(doc, s, Math.min(l, s + len));
        });
        text.delete(0, 2); // one segment may now start on a deleted character
        const before = segs.map((a) => ({ start: resolveAnchor(doc, a.start)!, end: resolveAnchor(doc, a.end)! }));
        const deltas: TextDelta[] = [];
        const record = (e: Y.YTextEvent) => void deltas.push(e.delta as TextDelta);
        text.observe(record);
        for (const e of edits) {
          const t = e.remote ? getText(remote) : text;
          if (e.del && t.length > 1) t.delete(e.at % t.length, Math.min(e.n, t.length - (e.at % t.length)));
          else t.insert(e.at % (t.length + 1), 'X'.repeat(e.n));
          if (!e.sync) continue; // replicas diverge: later edits are concurrent
          Y.applyUpdate(doc, Y.encodeStateAsUpdate(remote, Y.encodeStateVector(doc)));
          Y.applyUpdate(remote, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(remote)));
        }
        Y.applyUpdate(doc, Y.encodeStateAsUpdate(remote, Y.encodeStateVector(doc)));
        text.unobserve(record);
        segs.forEach((a, i) => {
          const m = mapRange(before[i]!.start, before[i]!.end, deltas);
          if (!m.touched) expect([m.start, m.end]).toEqual([resolveAnchor(doc, a.start), resolveAnchor(doc, a.end)]);
        });
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 300) },
    );
  });
});
