import { addCode, addSegment, correctText, createCodebookDoc, createTextDoc, newLayerDoc, updateCodeField } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { compareCodebook, compareText, pastDoc, readPastText, segmentsThenNow } from './compare.js';

// Invented transcript; expected changes worked out by hand from the edits.
const transcript = {
  turns: [
    { speaker: 'I', startMs: null, endMs: null, text: 'Who ran the bakery?' },
    { speaker: 'P03', startMs: null, endMs: null, text: 'My aunt Wilma ran it for thirty years.' },
  ],
};

describe('text versions', () => {
  it('reads the past text and lists what was added and removed since, by passage', () => {
    const doc = createTextDoc(transcript);
    const snap = Y.snapshot(doc);
    const t = doc.getText('text');
    correctText(doc, t.toString().indexOf('Wilma '), 'Wilma '.length); // de-identification
    correctText(doc, t.toString().indexOf('ran it'), 0, '[name] ');
    correctText(doc, t.toString().indexOf('thirty'), 'thirty'.length, '30');
    const past = pastDoc(doc, snap);
    expect(readPastText(past).text).toBe('Who ran the bakery?\nMy aunt Wilma ran it for thirty years.');
    expect(readPastText(past).turns.map((x) => x.speaker)).toEqual(['I', 'P03']);
    const now = t.toString();
    expect(now).toBe('Who ran the bakery?\nMy aunt [name] ran it for 30 years.');
    const c = compareText(doc, snap);
    expect(c.removed.map((r) => r.text)).toEqual(['Wilma ', 'thirty']);
    expect(c.added).toEqual([
      { at: now.indexOf('[name] '), text: '[name] ' },
      { at: now.indexOf('30'), text: '30' },
    ]);
    expect(c).toMatchObject({ wordsAdded: 2, wordsRemoved: 2 });
  });

  it('shows segments as they stood and where they are now; later segments are left out', () => {
    const doc = createTextDoc(transcript);
    const layer = newLayerDoc();
    const s = doc.getText('text').toString();
    const early = addSegment(layer, doc, { codeId: 'k', start: s.indexOf('My aunt'), end: s.indexOf(' for') }, () => 100);
    const snap = Y.snapshot(doc);
    correctText(doc, doc.getText('text').toString().indexOf('Wilma '), 'Wilma '.length);
    addSegment(layer, doc, { codeId: 'k', start: 0, end: 3 }, () => 300);
    const past = pastDoc(doc, snap);
    const rows = segmentsThenNow(past, doc, [{ coderId: 'u1', doc: layer }], 200);
    expect(rows).toEqual([
      {
        id: early,
        coderId: 'u1',
        codeId: 'k',
        then: expect.objectContaining({ quote: 'My aunt Wilma ran it' }),
        now: expect.objectContaining({ quote: 'My aunt ran it' }),
      },
    ]);
  });
});

describe('codebook versions', () => {
  it('lists codes added and removed and each field changed', () => {
    const cb = createCodebookDoc();
    const actor = { by: 'lead' };
    const kept = addCode(cb, { label: 'Family work', briefDefinition: 'Work done by relatives.' }, actor);
    const gone = addCode(cb, { label: 'Ovens' }, actor);
    const snap = Y.snapshot(cb);
    updateCodeField(cb, kept, 'briefDefinition', 'Paid or unpaid work by relatives.', actor);
    cb.getMap('codes').delete(gone);
    const added = addCode(cb, { label: 'Opening hours' }, actor);
    const past = pastDoc(cb, snap);
    expect(compareCodebook(past, cb)).toEqual({
      added: [{ id: added, label: 'Opening hours' }],
      removed: [{ id: gone, label: 'Ovens' }],
      changed: [{ id: kept, label: 'Family work', field: 'briefDefinition', then: 'Work done by relatives.', now: 'Paid or unpaid work by relatives.' }],
    });
  });
});
