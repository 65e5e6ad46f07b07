import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createUndoManager, withOrigin } from './undo.js';
import { createTextDoc } from './text-doc.js';
import { addSegment, getSegmentsMap, listSegments, newLayerDoc, setSegmentNote } from './layer-doc.js';
import { addCode, createCodebookDoc, getCode, getDefinitionText, codesMap } from './codebook-doc.js';
import { trackFieldEdits } from './field-edits.js';

function link(a: Y.Doc, b: Y.Doc): void {
  // live sync both ways, as a provider would (remote updates carry the peer doc as origin)
  a.on('update', (u: Uint8Array, origin: unknown) => origin !== b && Y.applyUpdate(b, u, a));
  b.on('update', (u: Uint8Array, origin: unknown) => origin !== a && Y.applyUpdate(a, u, b));
}

describe('per-user undo', () => {
  it("two synced replicas: one coder's undo never removes the other's work", () => {
    const lead = createCodebookDoc();
    const kim = new Y.Doc({ gc: false });
    Y.applyUpdate(kim, Y.encodeStateAsUpdate(lead));
    link(lead, kim);
    const leadUndo = createUndoManager(codesMap(lead), null, { captureTimeout: 0 });
    const kimUndo = createUndoManager(codesMap(kim), null, { captureTimeout: 0 });
    const a = addCode(lead, { label: 'belonging' }, { by: 'lead' });
    const b = addCode(kim, { label: 'distrust' }, { by: 'kim' });
    getDefinitionText(kim, a, 'inclusion').insert(0, 'Kim wrote this.');
    getDefinitionText(lead, a, 'inclusion').insert(0, 'Lead wrote this. ');
    expect(getCode(kim, a).inclusion).toBe('Lead wrote this. Kim wrote this.');
    leadUndo.undo(); // lead's definition edit
    expect(getCode(kim, a).inclusion).toBe('Kim wrote this.');
    leadUndo.undo(); // lead's code
    expect(codesMap(kim).has(a)).toBe(false);
    expect(getCode(lead, b).label).toBe('distrust'); // kim's code untouched
    kimUndo.undo(); // kim's edit lived inside lead's (now deleted) code; undo must not throw
    kimUndo.undo(); // kim's code
    expect(codesMap(lead).size).toBe(0);
    leadUndo.redo();
    expect(getCode(kim, a).label).toBe('belonging');
  });

  it('one replica, two origins (a server-side tool): undo is per origin', () => {
    const text = createTextDoc({ turns: [{ speaker: 'P2', startMs: 0, endMs: null, text: 'The bus stopped coming in winter.' }] });
    const layer = newLayerDoc();
    const segs = getSegmentsMap(layer);
    const ana = createUndoManager(segs, 'ana');
    const ben = createUndoManager(segs, 'ben');
    const sa = withOrigin(layer, 'ana', () => addSegment(layer, text, { codeId: 'access', start: 4, end: 7 }));
    const sb = withOrigin(layer, 'ben', () => addSegment(layer, text, { codeId: 'season', start: 25, end: 31 }));
    withOrigin(layer, 'ben', () => setSegmentNote(layer, sa, 'also weather?'));
    ana.undo();
    expect(listSegments(layer).map((s) => s.id)).toEqual([sb]);
    ben.undo();
    expect(listSegments(layer).map((s) => s.id)).toEqual([]);
    ana.redo();
    expect(listSegments(layer).map((s) => s.id)).toEqual([sa]);
  });

  it('recording run records for definition races is not undone with the edit', () => {
    const cb = createCodebookDoc();
    const id = addCode(cb, { label: 'care work' }, { by: 'lead' });
    trackFieldEdits(cb, { by: 'lead' });
    const um = createUndoManager(codesMap(cb), null, { captureTimeout: 0 });
    getDefinitionText(cb, id, 'briefDefinition').insert(0, 'Looking after others.');
    um.undo();
    expect(getCode(cb, id).briefDefinition).toBe('');
    expect(cb.getMap('fieldEdits').size).toBe(1);
  });
});
