import { addCase, addCode, addMemo, addSegment, correctText, createCodebookDoc, createMemosDoc, createTextDoc, defineAttribute, linkText, newLayerDoc, setCaseValue } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import { caseRows, codeRows, memoRows, segmentRows } from './rows.js';

// Invented data; expected rows worked out by hand.
const info = { layerDocId: 'L', studyId: 'S', textId: 'T', coderId: 'U' };

describe('projection rows', () => {
  it('segments carry their current offsets and quote; a fully deleted one is kept as orphaned', () => {
    const text = createTextDoc({ turns: [{ speaker: 'P05', startMs: null, endMs: null, text: 'We mended nets on the quay every Sunday.' }] });
    const layer = newLayerDoc();
    const s = text.getText('text').toString();
    const a = addSegment(layer, text, { codeId: 'c1', start: s.indexOf('mended nets'), end: s.indexOf(' on'), note: 'craft' }, () => 5);
    const b = addSegment(layer, text, { codeId: 'c2', start: s.indexOf('every'), end: s.indexOf('.') }, () => 6);
    correctText(text, 0, 3, 'They ');
    correctText(text, text.getText('text').toString().indexOf(' every Sunday'), ' every Sunday'.length);
    const rows = segmentRows(text, layer, info);
    expect(rows.find((r) => r.id === a)).toMatchObject({ ...info, codeId: 'c1', start: 5, end: 16, quote: 'mended nets', orphaned: false, note: 'craft', createdAt: new Date(5) });
    expect(rows.find((r) => r.id === b)).toMatchObject({ quote: '', orphaned: true, start: 28, end: 28 }); // where "every" stood: after "They mended nets on the quay"
  });

  it('codes, cases with values and text links, memos with what they attach to', () => {
    const cb = createCodebookDoc();
    const code = addCode(cb, { label: 'Repair', briefDefinition: 'Fixing things together.' }, { by: 'lead' });
    const attr = defineAttribute(cb, { name: 'Years on the quay', type: 'number' });
    const kase = addCase(cb, { name: 'P05', kind: 'participant' });
    setCaseValue(cb, kase, attr, 12);
    linkText(cb, kase, 'T');
    expect(codeRows(cb, 'S')).toMatchObject([{ studyId: 'S', id: code, label: 'Repair', briefDefinition: 'Fixing things together.', status: 'active' }]);
    expect(caseRows(cb, 'S')).toEqual({
      cases: [{ studyId: 'S', id: kase, name: 'P05', kind: 'participant' }],
      attributes: [{ studyId: 'S', id: attr, name: 'Years on the quay', type: 'number', choices: null }],
      values: [{ studyId: 'S', caseId: kase, attributeId: attr, value: 12 }],
      texts: [{ studyId: 'S', caseId: kase, textId: 'T' }],
    });
    const memos = createMemosDoc();
    addMemo(memos, { author: 'U', body: 'Ask about the winter.', attachedTo: { kind: 'segment', textId: 'T', segmentId: 'seg' } });
    expect(memoRows(memos, 'S')).toMatchObject([{ studyId: 'S', author: 'U', kind: 'memo', attachedKind: 'segment', attachedRef: 'T', segmentId: 'seg', body: 'Ask about the winter.' }]);
  });

  it('makes client-written values storable: U+0000 (not allowed in PostgreSQL text) and a NaN timestamp', () => {
    const text = createTextDoc({ turns: [{ speaker: null, startMs: null, endMs: null, text: 'net\u0000work' }] });
    const layer = newLayerDoc();
    addSegment(layer, text, { codeId: 'c\u00001', start: 0, end: 7 }, () => Number.NaN);
    const [row] = segmentRows(text, layer, info);
    expect(row).toMatchObject({ quote: 'net\uFFFDwor', codeId: 'c\uFFFD1' });
    expect(row!.createdAt.getTime()).toBe(0);
  });
});
