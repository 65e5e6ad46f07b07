// Packing flags for the worker-to-page trip: a lossless round trip through the structured-clone
// algorithm postMessage uses (with the typed arrays transferred), on flags from the model's engine
// over real Yjs documents. A round trip is its own check (common practice); the flag rules are DESIGN §4.
import { describe, expect, it } from 'vitest';
import {
  addCode, addExclusiveSet, addSegment, computeFlags, createCodebookDoc, createTextDoc, listSegments,
  newLayerDoc, resolveSegments,
} from '@gloss/model';
import { placeFlags, type Flag, type Segment } from './flag-view.js';
import { flagSetOf, packFlags, packedBuffers, unpackFlags } from './flag-pack.js';

function engineFlags(): Flag[] {
  const text = createTextDoc({ turns: [{ speaker: 'P01', startMs: 0, endMs: null, text: 'We keep the projector running on goodwill alone, most weeks anyway.' }] });
  const cb = createCodebookDoc();
  const by = { by: 'lead' };
  const warm = addCode(cb, { label: 'Goodwill' }, by);
  const cold = addCode(cb, { label: 'Obligation' }, by);
  addExclusiveSet(cb, 'Why they stay', [warm, cold], by);
  const ann = newLayerDoc();
  const bo = newLayerDoc();
  addSegment(ann, text, { codeId: warm, start: 8, end: 27 });
  addSegment(ann, text, { codeId: warm, start: 12, end: 30 }); // the same code twice by one coder
  addSegment(bo, text, { codeId: cold, start: 20, end: 47 });
  const layers = [{ layerId: 'A', coder: 'ann', doc: ann }, { layerId: 'B', coder: 'bo', doc: bo }];
  const segs = new Map<string, Segment>();
  for (const l of layers) for (const s of resolveSegments(text, listSegments(l.doc))) segs.set(s.id, { ...s, coderId: l.coder });
  return placeFlags(computeFlags({ textDoc: text, codebook: cb, layers }), segs);
}

describe('packFlags / unpackFlags', () => {
  it('gives back every flag after a structured clone with the buffers transferred', () => {
    const flags = engineFlags();
    expect(new Set(flags.map((f) => f.kind))).toEqual(new Set(['exclusive', 'duplicate', 'disagreement']));
    const packed = packFlags(flags);
    const sent = structuredClone(packed, { transfer: packedBuffers(packed) });
    expect(packed.kind.byteLength).toBe(0); // transferred, not copied
    const set = unpackFlags(sent);
    expect(set.length).toBe(flags.length);
    flags.forEach((f, i) => {
      expect(set.at(i)).toEqual(f);
      expect(set.kindAt(i)).toBe(f.kind);
      expect(set.startAt(i)).toBe(f.start);
    });
  });

  it('keeps the field of a definition race and refuses an index out of range', () => {
    const race: Flag = { id: 'definition-race:c1:inclusion', kind: 'definition-race', start: 0, end: 0, segmentIds: [], codeIds: ['c1'], field: 'inclusion' };
    const set = unpackFlags(structuredClone(packFlags([race])));
    expect(set.at(0)).toEqual(race);
    expect(() => set.at(1)).toThrow(RangeError);
    expect(flagSetOf([race]).at(0)).toBe(race);
  });
});
