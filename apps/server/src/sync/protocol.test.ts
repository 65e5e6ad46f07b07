/** Message kinds as y-protocols 1.0.7 writes them (sync.js, awareness.js, auth.js), read from the first bytes only. */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { describe, expect, it } from 'vitest';
import * as auth from 'y-protocols/auth';
import * as syncProtocol from 'y-protocols/sync';
import * as Y from 'yjs';
import { encodePermissionDenied, encodeSyncStep1, encodeSyncStep2, encodeSyncUpdate, peekKind } from './protocol.js';

const withType = (type: number, write: (e: encoding.Encoder) => void) => {
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, type);
  write(e);
  return encoding.toUint8Array(e);
};

describe('protocol', () => {
  const doc = new Y.Doc();
  doc.getText('text').insert(0, 'field note');

  it('classifies y-protocols sync messages', () => {
    expect(peekKind(withType(0, (e) => syncProtocol.writeSyncStep1(e, doc))).kind).toBe('sync-step1');
    expect(peekKind(withType(0, (e) => syncProtocol.writeSyncStep2(e, doc))).kind).toBe('sync-step2');
    expect(peekKind(withType(0, (e) => syncProtocol.writeUpdate(e, Y.encodeStateAsUpdate(doc)))).kind).toBe('sync-update');
    expect(peekKind(withType(1, (e) => encoding.writeVarUint8Array(e, new Uint8Array([0])))).kind).toBe('awareness');
    expect(peekKind(withType(3, () => {})).kind).toBe('query-awareness');
  });

  it('writes messages y-protocols reads', () => {
    const replica = new Y.Doc();
    const reply = encoding.createEncoder();
    for (const message of [encodeSyncStep2(Y.encodeStateAsUpdate(doc)), encodeSyncUpdate(Y.encodeStateAsUpdate(doc))]) {
      const d = decoding.createDecoder(message);
      expect(decoding.readVarUint(d)).toBe(0);
      syncProtocol.readSyncMessage(d, reply, replica, null);
    }
    expect(replica.getText('text').toString()).toBe('field note');
    const step1 = decoding.createDecoder(encodeSyncStep1(Y.encodeStateVector(replica)));
    decoding.readVarUint(step1);
    expect(syncProtocol.readSyncMessage(step1, encoding.createEncoder(), doc, null)).toBe(syncProtocol.messageYjsSyncStep1);
    let reason = '';
    const denied = decoding.createDecoder(encodePermissionDenied('read-only'));
    expect(decoding.readVarUint(denied)).toBe(2);
    auth.readAuthMessage(denied, replica, (_y, r) => (reason = r));
    expect(reason).toBe('read-only');
  });

  it('refuses unknown and truncated headers with typed errors', () => {
    expect(() => peekKind(new Uint8Array([9]))).toThrowError(expect.objectContaining({ code: 'unsupported-message', closeCode: 1003 }));
    expect(() => peekKind(new Uint8Array([0, 7]))).toThrowError(expect.objectContaining({ code: 'unsupported-message' }));
    expect(() => peekKind(new Uint8Array([]))).toThrowError(expect.objectContaining({ code: 'malformed-message', closeCode: 1007 }));
  });
});
