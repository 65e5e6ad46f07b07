/** The opening bundle's codec (opening.ts): what is encoded reads back the same; anything else is a clear error. */
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { decodeOpening, encodeOpening } from './opening.js';
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
    expect(() => decodeOpening(new Uint8Array([2, 0, 0]))).toThrow(/version 2/);
    expect(() => decodeOpening(bytes.slice(0, bytes.length - 1))).toThrow(InvalidArgumentError);
    expect(() => decodeOpening(new Uint8Array([...bytes, 0]))).toThrow(/after its last document/);
  });
});
