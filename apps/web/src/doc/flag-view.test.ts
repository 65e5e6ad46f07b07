// Flags from the model's engine over real Yjs documents, shown where their segments are now.
// The rule itself is DESIGN §4 ("exclusive": two codes of one mutually exclusive set on overlapping text, by anyone).
import { describe, expect, it } from 'vitest';
import {
  addCode, addExclusiveSet, addSegment, computeFlags, createCodebookDoc, createTextDoc, getCodes, listSegments,
  newLayerDoc, resolveSegments,
} from '@gloss/model';
import { describeFlag, placeFlags, type Segment } from './flag-view.js';

describe('placeFlags and describeFlag', () => {
  it('places an exclusive-set flag on the overlap and names both codes', () => {
    const text = createTextDoc({ turns: [{ speaker: 'P01', startMs: 0, endMs: null, text: 'We keep the projector running on goodwill alone.' }] });
    const cb = createCodebookDoc();
    const by = { by: 'lead' };
    const warm = addCode(cb, { label: 'Goodwill' }, by);
    const cold = addCode(cb, { label: 'Obligation' }, by);
    addExclusiveSet(cb, 'Why they stay', [warm, cold], by);
    const ann = newLayerDoc();
    const bo = newLayerDoc();
    addSegment(ann, text, { codeId: warm, start: 8, end: 27 }); // "the projector running"
    addSegment(bo, text, { codeId: cold, start: 20, end: 47 }); // "running on goodwill alone"
    const flags = computeFlags({ textDoc: text, codebook: cb, layers: [{ layerId: 'A', coder: 'ann', doc: ann }, { layerId: 'B', coder: 'bo', doc: bo }] });

    const segs = new Map<string, Segment>();
    for (const [layer, coderId] of [[ann, 'ann'], [bo, 'bo']] as const) {
      for (const s of resolveSegments(text, listSegments(layer))) segs.set(s.id, { ...s, coderId });
    }
    const ex = placeFlags(flags, segs).filter((f) => f.kind === 'exclusive');
    expect(ex).toHaveLength(1);
    expect(ex[0]).toMatchObject({ start: 20, end: 27 });
    const words = describeFlag(ex[0]!, new Map(getCodes(cb).map((c) => [c.id, c])));
    expect(words).toContain('“Goodwill”');
    expect(words).toContain('“Obligation”');
  });
});
