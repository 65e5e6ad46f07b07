import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTextDoc, correctText, getText } from './text-doc.js';
import {
  addSegment, getSegment, getSegmentsMap, listSegments, newLayerDoc, recodeSegment, removeSegment, resizeSegment, setSegmentNote, SEGMENTS_ROOT,
} from './layer-doc.js';
import { resolveSegments } from './resolve.js';
import { InvalidRangeError, NotFoundError } from './errors.js';

const text = () => createTextDoc({
  turns: [
    { speaker: 'I', startMs: 0, endMs: 2000, text: 'Where did you shop?' },
    { speaker: 'P3', startMs: 2000, endMs: 8000, text: 'The co-op, until it closed. Then the van on Thursdays.' },
  ],
});

describe('layer document', () => {
  it('stores segments under the DESIGN §2 contract: Y.Map "segments" of Y.Map{codeId, start, end, createdAt, note}', () => {
    const t = text();
    const layer = newLayerDoc();
    const id = addSegment(layer, t, { codeId: 'provision', start: 24, end: 29, note: 'shop' }, () => 42);
    const m = layer.getMap(SEGMENTS_ROOT).get(id) as Y.Map<unknown>;
    expect(m.get('codeId')).toBe('provision');
    expect(m.get('start')).toBeInstanceOf(Uint8Array);
    expect(m.get('end')).toBeInstanceOf(Uint8Array);
    expect(m.get('createdAt')).toBe(42);
    expect(m.get('note')).toBe('shop');
    const [r] = resolveSegments(t, listSegments(layer));
    expect(r).toMatchObject({ quote: 'co-op', orphaned: false, turn: { speaker: 'P3', startMs: 2000 } });
  });

  it('start sticks to its first character and end to its last: typing at either boundary stays outside', () => {
    const t = text();
    const layer = newLayerDoc();
    addSegment(layer, t, { codeId: 'k', start: 24, end: 29 }, () => 0);
    getText(t).insert(29, '-ish');
    getText(t).insert(24, 'old ');
    expect(resolveSegments(t, listSegments(layer))[0]!.quote).toBe('co-op');
    getText(t).insert(30, '!'); // inside
    expect(resolveSegments(t, listSegments(layer))[0]!.quote).toBe('co!-op');
  });

  it('resizes, recodes, notes and removes; a deleted segment text collapses and is kept', () => {
    const t = text();
    const layer = newLayerDoc();
    const id = addSegment(layer, t, { codeId: 'k', start: 24, end: 29 }, () => 0);
    resizeSegment(layer, t, id, 20, 29);
    recodeSegment(layer, id, 'k2');
    setSegmentNote(layer, id, 'check');
    expect(getSegment(layer, id)).toMatchObject({ codeId: 'k2', note: 'check' });
    setSegmentNote(layer, id, undefined);
    expect(getSegment(layer, id).note).toBeUndefined();
    correctText(t, 18, 14, '');
    const [r] = resolveSegments(t, listSegments(layer));
    expect(r).toMatchObject({ orphaned: true, quote: '' });
    removeSegment(layer, id);
    expect(listSegments(layer)).toEqual([]);
  });

  it('refuses bad ranges, unknown ids and empty codes, without writing anything', () => {
    const t = text();
    const layer = newLayerDoc();
    expect(() => addSegment(layer, t, { codeId: 'k', start: 5, end: 5 }, () => 0)).toThrow(InvalidRangeError);
    expect(() => addSegment(layer, t, { codeId: 'k', start: -1, end: 3 }, () => 0)).toThrow(InvalidRangeError);
    expect(() => addSegment(layer, t, { codeId: 'k', start: 0, end: 1e6 }, () => 0)).toThrow(InvalidRangeError);
    expect(() => addSegment(layer, t, { codeId: 'k', start: 0.5, end: 3 }, () => 0)).toThrow(InvalidRangeError);
    expect(() => addSegment(layer, t, { codeId: '', start: 0, end: 3 }, () => 0)).toThrow(expect.objectContaining({ code: 'invalid-argument' }));
    expect(() => removeSegment(layer, 'nope')).toThrow(NotFoundError);
    expect(() => recodeSegment(layer, 'nope', 'k')).toThrow(NotFoundError);
    expect(getSegmentsMap(layer).size).toBe(0);
  });

  it('skips malformed entries written by another program instead of crashing', () => {
    const layer = newLayerDoc();
    const bad = new Y.Map<unknown>();
    getSegmentsMap(layer).set('odd', bad);
    bad.set('codeId', 7);
    expect(listSegments(layer)).toEqual([]);
  });
});
