import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTextDoc, correctText, readText } from '../text-doc.js';
import { newLayerDoc, addSegment, recheckSegment, listSegments, recodeSegment } from '../layer-doc.js';
import { addCode, addExclusiveSet, createCodebookDoc, getDefinitionText, startRound, updateCodeField } from '../codebook-doc.js';
import { mergeCodes, reconcileLayer, retireCode } from '../codebook-ops.js';
import { trackFieldEdits } from '../field-edits.js';
import { computeFlags, FlagEngine, sortFlags } from './engine.js';
import { definitionRaceFlags } from './definition-race.js';
import type { Flag, FlagKind } from './types.js';

// Flag rules are DESIGN §4 (the project's own definitions); scenarios are invented.
const transcript = {
  turns: [
    { speaker: 'I', startMs: 0, endMs: 3000, text: 'What was the first winter like at the allotment?' },
    { speaker: 'P12', startMs: 3000, endMs: 12000, text: 'Cold, and lonely at first. Then Mrs Oduya started the soup rota and people came.' },
  ],
};

let t = 1_000;
const clock = () => ++t;
const lead = { by: 'lead', clock };

function setup() {
  const text = createTextDoc(transcript);
  const cb = createCodebookDoc();
  const A = addCode(cb, { id: 'isolation', label: 'isolation' }, lead);
  const B = addCode(cb, { id: 'mutual-aid', label: 'mutual aid' }, lead);
  const C = addCode(cb, { id: 'weather', label: 'weather' }, lead);
  const ana = newLayerDoc();
  const ben = newLayerDoc();
  const layers = [
    { layerId: 'L-ana', coder: 'ana', doc: ana },
    { layerId: 'L-ben', coder: 'ben', doc: ben },
  ];
  const at = (words: string) => {
    const i = readText(text).indexOf(words);
    if (i < 0) throw new Error(words);
    return { start: i, end: i + words.length };
  };
  return { text, cb, A, B, C, ana, ben, layers, at };
}

const kinds = (flags: Flag[], kind: FlagKind) => flags.filter((f) => f.kind === kind);

describe('flags', () => {
  it('disagreement: another coder coded overlapping text without my code; hidden during independent coding', () => {
    const { text, cb, A, B, ana, ben, layers, at } = setup();
    const sa = addSegment(ana, text, { codeId: A, ...at('lonely at first') }, clock);
    const sb = addSegment(ben, text, { codeId: B, ...at('at first. Then') }, clock);
    let d = kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'disagreement');
    expect(d.map((f) => f.segments[0]!.segmentId).sort()).toEqual([sa, sb].sort());
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers, independentCoding: true }), 'disagreement')).toEqual([]);
    // ben also applies ana's code there: ana's segment no longer disagrees, ben's B still does
    addSegment(ben, text, { codeId: A, ...at('lonely') }, clock);
    d = kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'disagreement');
    expect(d.map((f) => f.segments[0]!.segmentId)).toEqual([sb]);
  });

  it('exclusive: two codes of one mutually exclusive set on overlapping text, by anyone', () => {
    const { text, cb, A, B, C, ana, ben, layers, at } = setup();
    addExclusiveSet(cb, 'tone', [A, B], lead);
    addSegment(ana, text, { codeId: A, ...at('Cold, and lonely') }, clock);
    addSegment(ana, text, { codeId: C, ...at('Cold') }, clock); // C is outside the set
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'exclusive')).toEqual([]);
    addSegment(ben, text, { codeId: B, ...at('lonely at') }, clock);
    const ex = kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'exclusive');
    expect(ex).toHaveLength(1);
    expect(ex[0]!.codeIds.sort()).toEqual([A, B].sort());
    // adjacent, not overlapping: no flag
    const cb2 = cb;
    void cb2;
  });

  it('duplicate: one coder, one code, overlapping segments; touching ones are fine', () => {
    const { text, cb, A, ana, layers, at } = setup();
    addSegment(ana, text, { codeId: A, ...at('Cold, and') }, clock);
    addSegment(ana, text, { codeId: A, ...at(' lonely') }, clock);
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'duplicate')).toEqual([]);
    addSegment(ana, text, { codeId: A, ...at('and lonely') }, clock);
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'duplicate')).toHaveLength(2);
  });

  it('orphaned: a segment whose text is deleted entirely is flagged, never dropped', () => {
    const { text, cb, A, ana, layers, at } = setup();
    const s = addSegment(ana, text, { codeId: A, ...at('Mrs Oduya') }, clock);
    const r = at('Mrs Oduya');
    correctText(text, r.start, r.end - r.start, '[NAME]'); // de-identification
    const flags = computeFlags({ textDoc: text, codebook: cb, layers });
    expect(kinds(flags, 'orphaned').map((f) => f.segments[0]!.segmentId)).toEqual([s]);
    expect(listSegments(ana)).toHaveLength(1);
  });

  it('retired-code: an offline client applies a code merged meanwhile; reconcile moves it on', () => {
    const { text, cb, A, B, ana, layers, at } = setup();
    // the offline coder's replicas of the codebook and of their layer
    const cbOffline = new Y.Doc({ gc: false });
    Y.applyUpdate(cbOffline, Y.encodeStateAsUpdate(cb));
    const anaOffline = new Y.Doc({ gc: false });
    mergeCodes(cb, [A], B, { ...lead, reason: 'same idea' });
    const s = addSegment(anaOffline, text, { codeId: A, ...at('lonely') }, clock); // applies the old code
    Y.applyUpdate(ana, Y.encodeStateAsUpdate(anaOffline));
    Y.applyUpdate(cb, Y.encodeStateAsUpdate(cbOffline));
    const rc = kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'retired-code');
    expect(rc.map((f) => [f.segments[0]!.segmentId, f.codeIds])).toEqual([[s, [A, B]]]);
    expect(reconcileLayer(cb, ana)).toBe(1);
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'retired-code')).toEqual([]);
    expect(listSegments(ana)[0]!.codeId).toBe(B);
    // a retired code (no successor) stays flagged
    retireCode(cb, B, lead);
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'retired-code')).toHaveLength(1);
  });

  it('stale-definition: coded before its definition changed in a later round, until re-checked', () => {
    const { text, cb, A, ana, layers, at } = setup();
    startRound(cb, lead); // round 1
    const s = addSegment(ana, text, { codeId: A, ...at('lonely'), round: 1 }, clock);
    updateCodeField(cb, A, 'inclusion', 'Being without company, said or implied.', lead); // same round: not stale
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'stale-definition')).toEqual([]);
    startRound(cb, lead); // round 2
    updateCodeField(cb, A, 'exclusion', 'Not: choosing to be alone.', lead);
    const st = kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'stale-definition');
    expect(st.map((f) => [f.segments[0]!.segmentId, f.field])).toEqual([[s, 'exclusion']]);
    recheckSegment(ana, s, clock);
    expect(kinds(computeFlags({ textDoc: text, codebook: cb, layers }), 'stale-definition')).toEqual([]);
  });

  describe('definition-race', () => {
    function replicas() {
      const { cb, A } = setup();
      const lee = new Y.Doc({ gc: false });
      const kim = new Y.Doc({ gc: false });
      Y.applyUpdate(lee, Y.encodeStateAsUpdate(cb));
      Y.applyUpdate(kim, Y.encodeStateAsUpdate(cb));
      trackFieldEdits(lee, { by: 'lee', clock });
      trackFieldEdits(kim, { by: 'kim', clock });
      const sync = () => {
        Y.applyUpdate(kim, Y.encodeStateAsUpdate(lee, Y.encodeStateVector(kim)));
        Y.applyUpdate(lee, Y.encodeStateAsUpdate(kim, Y.encodeStateVector(lee)));
      };
      return { lee, kim, A, sync };
    }

    it('edits of one field made without seeing each other race, even far apart in the text', () => {
      const { lee, kim, A, sync } = replicas();
      getDefinitionText(lee, A, 'inclusion').insert(0, 'Feeling cut off from others. ');
      sync();
      getDefinitionText(lee, A, 'inclusion').insert(0, 'Use when ');
      const kt = getDefinitionText(kim, A, 'inclusion');
      kt.insert(kt.length, 'Include physical distance.'); // kim has not seen lee's second edit
      sync();
      for (const doc of [lee, kim]) {
        const r = definitionRaceFlags(doc);
        expect(r.map((f) => [f.codeIds[0], f.field, f.people])).toEqual([[A, 'inclusion', ['kim', 'lee']]]);
      }
    });

    it('a deletion concurrent with an insertion races too', () => {
      const { lee, kim, A, sync } = replicas();
      getDefinitionText(lee, A, 'exclusion').insert(0, 'Not solitude by choice.');
      sync();
      getDefinitionText(lee, A, 'exclusion').delete(0, 4);
      getDefinitionText(kim, A, 'exclusion').insert(23, ' Not grief.');
      sync();
      expect(definitionRaceFlags(lee)).toHaveLength(1);
    });

    it('edits in turn (each saw the other) do not race; neither do different fields', () => {
      const { lee, kim, A, sync } = replicas();
      getDefinitionText(lee, A, 'inclusion').insert(0, 'First wording.');
      sync();
      getDefinitionText(kim, A, 'inclusion').insert(0, 'Second, ');
      sync();
      getDefinitionText(lee, A, 'inclusion').insert(0, 'Third: ');
      getDefinitionText(kim, A, 'exclusion').insert(0, 'Elsewhere.'); // concurrent, but another field
      sync();
      expect(definitionRaceFlags(lee)).toEqual([]);
      expect(getDefinitionText(lee, A, 'inclusion').toString()).toBe('Third: Second, First wording.');
    });

    it('is settled once someone edits the field having seen both sides', () => {
      const { lee, kim, A, sync } = replicas();
      getDefinitionText(lee, A, 'briefDefinition').insert(0, 'Alone.');
      getDefinitionText(kim, A, 'briefDefinition').insert(0, 'Apart.');
      sync();
      expect(definitionRaceFlags(kim)).toHaveLength(1);
      const t2 = getDefinitionText(kim, A, 'briefDefinition');
      t2.delete(0, t2.length);
      t2.insert(0, 'Apart from others.');
      sync();
      expect(definitionRaceFlags(lee)).toEqual([]);
    });

    it('same-gap insertions race even from replicas that recorded nothing (read from the Yjs items)', () => {
      const { cb, A } = setup();
      const x = new Y.Doc({ gc: false });
      const y = new Y.Doc({ gc: false });
      Y.applyUpdate(x, Y.encodeStateAsUpdate(cb));
      Y.applyUpdate(y, Y.encodeStateAsUpdate(cb));
      getDefinitionText(x, A, 'fullDefinition').insert(0, 'One view.');
      getDefinitionText(y, A, 'fullDefinition').insert(0, 'Another view.');
      Y.applyUpdate(x, Y.encodeStateAsUpdate(y));
      expect(definitionRaceFlags(x).map((f) => f.field)).toEqual(['fullDefinition']);
      // sequential edits without records: no race
      const z = new Y.Doc({ gc: false });
      Y.applyUpdate(z, Y.encodeStateAsUpdate(cb));
      getDefinitionText(z, A, 'fullDefinition').insert(0, 'One view.');
      const w = new Y.Doc({ gc: false });
      Y.applyUpdate(w, Y.encodeStateAsUpdate(z));
      getDefinitionText(w, A, 'fullDefinition').insert(9, ' And more.');
      Y.applyUpdate(z, Y.encodeStateAsUpdate(w));
      expect(definitionRaceFlags(z)).toEqual([]);
    });
  });

  it('the engine follows layers added and removed, and independent coding switched on', () => {
    const { text, cb, A, B, ana, ben, at } = setup();
    addSegment(ana, text, { codeId: A, ...at('soup rota') }, clock);
    addSegment(ben, text, { codeId: B, ...at('soup') }, clock);
    const engine = new FlagEngine({ textDoc: text, codebook: cb, layers: [{ layerId: 'L-ana', coder: 'ana', doc: ana }] });
    expect(engine.flags()).toEqual([]);
    engine.addLayer({ layerId: 'L-ben', coder: 'ben', doc: ben });
    expect(kinds(engine.flags(), 'disagreement')).toHaveLength(2);
    engine.setIndependentCoding(true);
    expect(engine.flags()).toEqual([]);
    engine.setIndependentCoding(false);
    engine.removeLayer('L-ben');
    expect(engine.flags()).toEqual([]);
    expect(() => engine.removeLayer('L-ben')).toThrow(expect.objectContaining({ code: 'not-found' }));
    engine.destroy();
  });

  it('the engine updates incrementally: one edit re-evaluates only the segments it touched', () => {
    const { text, cb, A, B, ana, ben, layers, at } = setup();
    const engine = new FlagEngine({ textDoc: text, codebook: cb, layers });
    addSegment(ana, text, { codeId: A, ...at('Cold, and lonely') }, clock);
    const sb = addSegment(ben, text, { codeId: B, ...at('soup rota') }, clock);
    addSegment(ben, text, { codeId: B, ...at('people came') }, clock);
    expect(engine.flags().map((f) => f.kind)).toEqual([]);
    recodeSegment(ben, sb, A);
    engine.flags();
    expect(engine.lastRecomputed).toBe(1);
    correctText(text, at('allotment').start + 3, 0, 'x'); // away from every segment boundary
    expect(sortFlags(engine.flags())).toEqual(computeFlags({ textDoc: text, codebook: cb, layers }));
    expect(engine.lastRecomputed).toBe(0);
    correctText(text, at('Cold').start, 0, 'Very '); // at a segment's start: that segment is re-resolved
    expect(sortFlags(engine.flags())).toEqual(computeFlags({ textDoc: text, codebook: cb, layers }));
    expect(engine.lastRecomputed).toBe(1);
    const r = at('lonely');
    correctText(text, r.start, r.end - r.start, ''); // a deletion inside ana's segment
    const changes = engine.refresh();
    expect([changes.added, changes.removed]).toEqual([[], []]);
    expect(engine.lastRecomputed).toBe(1);
    engine.destroy();
  });
});
