import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import { decodeAnchor } from './anchor-codec.js';

describe('decodeAnchor', () => {
  it('reads what Y.encodeRelativePosition wrote (reference: Yjs decodeRelativePosition)', () => {
    fc.assert(
      fc.property(fc.nat({ max: 2 ** 32 - 1 }), fc.nat({ max: 2 ** 40 }), fc.integer({ min: -3, max: 3 }), (client, clock, assoc) => {
        const bytes = Y.encodeRelativePosition(new Y.RelativePosition(null, null, Y.createID(client, clock), assoc));
        const ref = Y.decodeRelativePosition(bytes);
        expect(decodeAnchor(bytes)).toEqual({ client: ref.item!.client, clock: ref.item!.clock, assoc: ref.assoc, tname: null });
      }),
      { numRuns: Number(process.env.FC_RUNS ?? 300) },
    );
  });

  it('hands type-level anchors to Yjs', () => {
    const doc = new Y.Doc();
    const t = doc.getText('text');
    const bytes = Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(t, 0, -1));
    expect(decodeAnchor(bytes)).toEqual({ client: null, clock: 0, assoc: -1, tname: 'text' });
  });
});
