import { describe, expect, it } from 'vitest';
import { addCode, addExample, createCodebookDoc, getCode } from './codebook-doc.js';
import { exampleFromSegment, resolveExample } from './examples.js';
import { addSegment, newLayerDoc } from './layer-doc.js';
import { correctText, createTextDoc, readText } from './text-doc.js';

describe('examples linked to segments', () => {
  it('stay true when the text is corrected, and say that it changed', () => {
    const text = createTextDoc({ turns: [{ speaker: 'P5', startMs: 0, endMs: null, text: 'My neighbour Mr Kettering drove me to every appointment.' }] });
    const layer = newLayerDoc();
    const at = readText(text).indexOf('Mr Kettering drove me');
    const seg = addSegment(layer, text, { codeId: 'k', start: at, end: at + 'Mr Kettering drove me'.length });
    const cb = createCodebookDoc();
    const code = addCode(cb, { label: 'practical help' }, { by: 'lead' });
    addExample(cb, code, exampleFromSegment(text, layer, 'text-5', seg), 'example', { by: 'lead' });
    const stored = getCode(cb, code).examples[0]!;
    expect(stored.quote).toBe('Mr Kettering drove me');
    correctText(text, at, 'Mr Kettering'.length, '[neighbour]'); // de-identification
    expect(resolveExample(text, stored)).toMatchObject({ current: '[neighbour] drove me', changed: true });
    expect(resolveExample(text, { quote: 'no anchors' })).toEqual({ current: 'no anchors', start: null, end: null, changed: false });
  });
});
