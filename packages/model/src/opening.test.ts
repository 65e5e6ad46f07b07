/** The opening bundle's codec (opening.ts): what is encoded reads back the same; anything else is a clear error. */
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { decodeOpening, decodeStateVectors, encodeOpening, encodeStateVectors } from './opening.js';
import { InvalidArgumentError } from './errors.js';

describe('opening bundle', () => {
  it('round-trips a ticket and whole-document states', () => {
    const doc = new Y.Doc();
    doc.getText('text').insert(0, 'keys to the shed');
    const state = Y.encodeStateAsUpdate(doc);
    const bytes = encodeOpening({ ticket: 'abc_-1', docs: [{ room: 'r1', kind: 'text', state }, { room: 'r2', kind: 'layer', state: new Uint8Array() }] });
    const back = decodeOpening(bytes);
    expect(back.ticket).toBe('abc_-1');
    expect(back.docs.map((d) => [d.room, d.kind, d.state.byteLength])).toEqual([['r1', 'text', state.byteLength], ['r2', 'layer', 0]]);
    const copy = new Y.Doc();
    Y.applyUpdate(copy, back.docs[0]!.state);
    expect(copy.getText('text').toString()).toBe('keys to the shed');
  });

  it('refuses another version, a cut-off message and trailing bytes with an InvalidArgumentError', () => {
    const bytes = encodeOpening({ ticket: '', docs: [{ room: 'r1', kind: 'text', state: new Uint8Array([1, 2, 3]) }] });
    expect(() => decodeOpening(new Uint8Array([3, 0, 0]))).toThrow(/version 3/);
    expect(() => decodeOpening(bytes.slice(0, bytes.length - 1))).toThrow(InvalidArgumentError);
    expect(() => decodeOpening(new Uint8Array([...bytes, 0]))).toThrow(/after its last document/);
  });

  it('version 2 carries, per document, whether the state is a difference and the state vector it brings the copy to', () => {
    const doc = new Y.Doc();
    doc.getText('text').insert(0, 'keys');
    const sv = Y.encodeStateVector(doc);
    doc.getText('text').insert(4, ' to the shed');
    const diff = Y.encodeStateAsUpdate(doc, sv);
    const bytes = encodeOpening({ ticket: 't', docs: [{ room: 'r1', kind: 'text', state: diff, diff: true, stateVector: Y.encodeStateVector(doc) }, { room: 'r2', kind: 'layer', state: new Uint8Array([0, 0]), diff: false, stateVector: new Uint8Array([0]) }] });
    expect(bytes[0]).toBe(2);
    const back = decodeOpening(bytes);
    expect(back.docs.map((d) => [d.room, d.diff])).toEqual([['r1', true], ['r2', false]]);
    expect(Y.decodeStateVector(back.docs[0]!.stateVector!)).toEqual(Y.decodeStateVector(Y.encodeStateVector(doc)));
    // a document without a state vector still reads as version 1, as before
    expect(encodeOpening({ ticket: '', docs: [{ room: 'r1', kind: 'text', state: diff }] })[0]).toBe(1);
    expect(decodeOpening(encodeOpening({ ticket: '', docs: [{ room: 'r1', kind: 'text', state: diff }] })).docs[0]!.diff).toBeUndefined();
  });

  it('state vectors by room round-trip; a cut-off or padded message is an InvalidArgumentError', () => {
    const doc = new Y.Doc();
    doc.getText('t').insert(0, 'x');
    const map = new Map([['room-a', Y.encodeStateVector(doc)], ['room-b', new Uint8Array([0])]]);
    const bytes = encodeStateVectors(map);
    expect(decodeStateVectors(bytes)).toEqual(map);
    expect(() => decodeStateVectors(bytes.slice(0, bytes.length - 1))).toThrow(InvalidArgumentError);
    expect(() => decodeStateVectors(new Uint8Array([...bytes, 0]))).toThrow(/after the last room/);
  });
});
