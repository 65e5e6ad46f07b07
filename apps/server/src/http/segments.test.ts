import { addCode, addSegment, createCodebookDoc, createTextDoc, newLayerDoc } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import { segmentsWithFlags } from './segments.js';

// "Coders differ" (DESIGN §4) is a comparison: it follows agreement/coders.ts, as the report does.
describe('segmentsWithFlags: the disagreement flag compares the counted coders only', () => {
  const text = createTextDoc({ turns: [{ speaker: 'P05', startMs: null, endMs: null, text: 'We rowed out past the lighthouse every Sunday in June.' }] });
  const cb = createCodebookDoc();
  const actor = { by: 'lead' };
  const ritual = addCode(cb, { label: 'Weekly ritual' }, actor);
  const sea = addCode(cb, { label: 'The sea' }, actor);
  const at = 'We rowed out past the lighthouse'.length;
  const layer = (coderId: string, codeId?: string) => {
    const doc = newLayerDoc();
    if (codeId) addSegment(doc, text, { codeId, start: 0, end: at });
    return { layerDocId: `L-${coderId}`, coderId, doc };
  };
  const ana = layer('ana', ritual);
  const ben = layer('ben', sea);
  const lee = layer('lee'); // opened the text, coded nothing

  const flagsOf = (out: ReturnType<typeof segmentsWithFlags>, coderId: string) => out.find((s) => s.coderId === coderId)!.flags;

  it('by default: two coders who coded the passage differently are flagged; an empty layer changes nothing', () => {
    const both = segmentsWithFlags(text, cb, [ana, ben]);
    expect(flagsOf(both, 'ana')).toEqual(['disagreement']);
    expect(segmentsWithFlags(text, cb, [ana, ben, lee])).toEqual(both);
  });

  it("with a round's participants, someone outside the round is shown but not compared", () => {
    const out = segmentsWithFlags(text, cb, [ana, ben, lee], { participants: ['ana', 'lee'] });
    expect(out.map((s) => s.coderId).sort()).toEqual(['ana', 'ben']);
    expect(flagsOf(out, 'ana')).toEqual([]);
    expect(flagsOf(out, 'ben')).toEqual([]);
  });
});
