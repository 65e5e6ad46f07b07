import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTextDoc, correctText, readText } from './text-doc.js';
import { addSegment, newLayerDoc, removeSegment, resizeSegment } from './layer-doc.js';
import { addCode, createCodebookDoc, updateCodeField } from './codebook-doc.js';
import { compareCodebook, compareText, getVersion, listVersions, nameVersion, openVersion, segmentsAsTheyStood } from './versions.js';
import { getText } from './text-doc.js';

let t = 0;
const clock = () => ++t;

describe('versions', () => {
  it('names a version, opens it as it stood, and compares it with now', () => {
    const text = createTextDoc({ turns: [{ speaker: 'P4', startMs: 0, endMs: null, text: 'We kept bees behind the chapel until the storm in March.' }] });
    const layer = newLayerDoc();
    const cb = createCodebookDoc();
    const code = addCode(cb, { label: 'land use', briefDefinition: 'How the ground is used.' }, { by: 'lead', clock });
    const s1 = addSegment(layer, text, { codeId: code, start: 0, end: 30 }, clock); // "We kept bees behind the chapel"
    const v = nameVersion(cb, { 'text:t1': text, 'layer:l1': layer, codebook: cb }, 'before calibration', { by: 'lead', clock });
    expect(listVersions(cb).map((x) => x.name)).toEqual(['before calibration']);

    correctText(text, 13, 6, 'beyond'); // behind -> beyond
    correctText(text, readText(text).length - 1, 1, ', which took the hives.');
    resizeSegment(layer, text, s1, 0, 12);
    addSegment(layer, text, { codeId: code, start: 20, end: 30 }, clock);
    updateCodeField(cb, code, 'briefDefinition', 'How people use the ground.', { by: 'lead', clock });

    const v2 = getVersion(cb, v.id);
    const oldText = openVersion(text, v2.snapshots['text:t1']!);
    expect(getText(oldText).toString()).toBe('We kept bees behind the chapel until the storm in March.');
    const stood = segmentsAsTheyStood(text, v2.snapshots['text:t1']!, layer, v2.snapshots['layer:l1']!);
    expect(stood.map((s) => s.quote)).toEqual(['We kept bees behind the chapel']);

    const cmp = compareText(text, v2.snapshots['text:t1']!);
    expect(cmp.changes).toEqual([
      { kind: 'removed', words: ['behind'], at: 3 },
      { kind: 'added', words: ['beyond'], at: 3 },
      { kind: 'removed', words: ['March.'], at: 10 },
      { kind: 'added', words: ['March,', 'which', 'took', 'the', 'hives.'], at: 10 },
    ]);
    expect([cmp.wordsAdded, cmp.wordsRemoved]).toEqual([6, 2]);

    const cc = compareCodebook(cb, v2.snapshots.codebook!);
    expect(cc.changed).toEqual([{ codeId: code, label: 'land use', field: 'briefDefinition', before: 'How the ground is used.', after: 'How people use the ground.' }]);
  });

  it('a past version keeps a segment removed since', () => {
    const text = createTextDoc({ turns: [{ speaker: null, startMs: null, endMs: null, text: 'The ferry stopped in 1998.' }] });
    const layer = newLayerDoc();
    const s = addSegment(layer, text, { codeId: 'k', start: 4, end: 9 }, clock);
    const snapText = Y.encodeSnapshot(Y.snapshot(text));
    const snapLayer = Y.encodeSnapshot(Y.snapshot(layer));
    removeSegment(layer, s);
    correctText(text, 0, 10, '');
    expect(segmentsAsTheyStood(text, snapText, layer, snapLayer).map((x) => x.quote)).toEqual(['ferry']);
  });
});
