/**
 * De-identification on documents. Expected values are worked by hand on invented sentences (the
 * quotes each segment must keep); that deleted content survives in an update when gc is off, and is
 * absent from a document rebuilt from the current state, is Yjs v13's documented behaviour
 * (Y.Doc option `gc`; common practice).
 */
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { addSegment, listSegments, newLayerDoc } from './layer-doc.js';
import { resolveSegments } from './resolve.js';
import { createTextDoc, readText } from './text-doc.js';
import { readTurns } from './turns.js';
import { applyEdits, mapBoundary, planEdits, rebuildTextDoc, reanchorLayer } from './deid.js';

const contains = (bytes: Uint8Array, s: string) => Buffer.from(bytes).includes(Buffer.from(s, 'utf8'));

const sample = () => createTextDoc({
  turns: [
    { speaker: 'I', startMs: 0, endMs: 1000, text: 'Who helped you?' },
    { speaker: 'P3', startMs: 1000, endMs: 9000, text: 'Dana Whitcombe drove me to Lowmere. Dana knew the Lowmere clinic well.' },
  ],
});

describe('planEdits', () => {
  it('finds whole words only, longest original first, never overlapping', () => {
    const text = 'Dana Whitcombe met Danae; Dana left.';
    const edits = planEdits(text, [{ original: 'Dana', pseudonym: '[Person 1]' }, { original: 'Dana Whitcombe', pseudonym: '[Person 1]' }]);
    expect(edits.map((e) => text.slice(e.start, e.end))).toEqual(['Dana Whitcombe', 'Dana']);
    expect(edits[1]!.start).toBe(26);
  });

  it('maps boundaries: outside edits they shift, inside they widen to the pseudonym', () => {
    const edits = [{ start: 4, end: 8, insert: '[P1]xx' }]; // 4 chars become 6
    expect(mapBoundary(2, edits, 'start')).toBe(2);
    expect(mapBoundary(10, edits, 'start')).toBe(12);
    expect(mapBoundary(4, edits, 'start')).toBe(4);
    expect(mapBoundary(6, edits, 'start')).toBe(4);
    expect(mapBoundary(8, edits, 'end')).toBe(10);
    expect(mapBoundary(6, edits, 'end')).toBe(10);
    expect(mapBoundary(4, edits, 'end')).toBe(4);
  });
});

describe('applyEdits and the purge', () => {
  it('replaces every occurrence and keeps each segment on its words', () => {
    const doc = sample();
    const layer = newLayerDoc();
    const t = readText(doc);
    const at = (s: string, from = 0) => t.indexOf(s, from);
    // a segment exactly on a name, one starting at a name, one ending at a name, one elsewhere
    addSegment(layer, doc, { codeId: 'c', start: at('Dana Whitcombe'), end: at('Dana Whitcombe') + 14 });
    addSegment(layer, doc, { codeId: 'c', start: at('Dana Whitcombe'), end: at(' to Lowmere') });
    addSegment(layer, doc, { codeId: 'c', start: at('drove'), end: at('Lowmere') + 7 });
    addSegment(layer, doc, { codeId: 'c', start: at('knew'), end: at('knew') + 4 });
    const before = resolveSegments(doc, listSegments(layer)).map((s) => s.quote);
    const reps = [{ original: 'Dana Whitcombe', pseudonym: '[Person 1]' }, { original: 'Dana', pseudonym: '[Person 1]' }, { original: 'Lowmere', pseudonym: '[Place A]' }];
    applyEdits(doc, [layer], planEdits(t, reps));
    expect(readText(doc)).toBe('Who helped you?\n[Person 1] drove me to [Place A]. [Person 1] knew the [Place A] clinic well.');
    const after = resolveSegments(doc, listSegments(layer)).map((s) => s.quote);
    const replaced = (q: string) => q.replace('Dana Whitcombe', '[Person 1]').replace(/\bDana\b/g, '[Person 1]').replace(/Lowmere/g, '[Place A]');
    expect(after).toEqual(before.map(replaced));
    expect([...after].sort()).toEqual(['[Person 1]', '[Person 1] drove me', 'drove me to [Place A]', 'knew']);
    // gc is off: the deleted names are still in the document's state
    expect(contains(Y.encodeStateAsUpdate(doc), 'Whitcombe')).toBe(true);
  });

  it('a rebuilt document holds no deleted content; re-anchored segments and turns keep their offsets and quotes', () => {
    const doc = sample();
    const layer = newLayerDoc();
    const t = readText(doc);
    addSegment(layer, doc, { codeId: 'c', start: t.indexOf('drove'), end: t.indexOf('clinic') + 6 });
    applyEdits(doc, [layer], planEdits(t, [{ original: 'Whitcombe', pseudonym: '[Surname]' }]));
    const quote = resolveSegments(doc, listSegments(layer))[0]!.quote;
    const fresh = rebuildTextDoc(doc);
    expect(readText(fresh)).toBe(readText(doc));
    expect(readTurns(fresh)).toEqual(readTurns(doc));
    expect(contains(Y.encodeStateAsUpdate(fresh), 'Whitcombe')).toBe(false);
    expect(reanchorLayer(doc, fresh, layer)).toBe(1);
    const [seg] = resolveSegments(fresh, listSegments(layer));
    expect(seg).toMatchObject({ quote, unresolved: false, orphaned: false });
    // the old document's history cannot merge into the new one: no shared client ids
    expect([...fresh.store.clients.keys()].some((c) => doc.store.clients.has(c))).toBe(false);
  });
});
