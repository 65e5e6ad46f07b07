/**
 * The memos filter against Yjs itself (common practice: a filtered state must apply to a stock Y.Doc,
 * keep its clocks equal to the server's, and let later updates of every client apply in order).
 */
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { addMemo, addReply, listMemos, removeMemo, updateMemo } from '@gloss/model';
import { entryFacts, mayReadEntry, viewKey, type MemoReaderView } from '../access/memo-view.js';
import { readableMemos, readableMemosState } from '../access/memo-readers.js';

const textA = '00000000-0000-4000-8000-00000000000a';
const textB = '00000000-0000-4000-8000-00000000000b';

function view(over: Partial<MemoReaderView>): MemoReaderView {
  const v = { userId: 'trainee', texts: [textA], othersLayers: false, sharedCoders: {}, independent: {}, ...over };
  return { ...v, key: viewKey(v) };
}

const has = (bytes: Uint8Array, word: string) => Buffer.from(bytes).includes(Buffer.from(word));

describe('memos filtered per reader', () => {
  it('withholds entries on unassigned texts with GC placeholders: clocks stay equal, later updates apply', () => {
    const server = new Y.Doc({ gc: false });
    const a = addMemo(server, { author: 'lead', kind: 'jotting', body: 'MARK-A-visible', attachedTo: { kind: 'text', textId: textA } });
    const b = addMemo(server, { author: 'lead', kind: 'jotting', body: 'MARK-B-hidden', attachedTo: { kind: 'text', textId: textB } });
    addReply(server, b, { author: 'lead', body: 'MARK-B-reply' });
    const study = addMemo(server, { author: 'lead', body: 'MARK-study', attachedTo: { kind: 'study' } });
    const gone = addMemo(server, { author: 'lead', body: 'MARK-B-deleted', attachedTo: { kind: 'text', textId: textB } });
    removeMemo(server, gone);
    const v = view({});

    const state = readableMemosState(Y.encodeStateAsUpdate(server), v);
    for (const hidden of ['MARK-B-hidden', 'MARK-B-reply', 'MARK-B-deleted']) expect(has(state, hidden)).toBe(false);
    expect(has(state, 'MARK-A-visible')).toBe(true);

    const client = new Y.Doc();
    Y.applyUpdate(client, state);
    expect(listMemos(client, { replies: true }).map((m) => m.id).sort()).toEqual([a, study].sort());
    expect(Y.encodeStateVector(client)).toEqual(Y.encodeStateVector(server));

    // live: the server applies each change, then sends it filtered
    const live: Uint8Array[] = [];
    server.on('update', (u: Uint8Array) => live.push(readableMemos(server, u, v)));
    updateMemo(server, b, { body: 'MARK-B-edit' });
    updateMemo(server, a, { body: 'MARK-A-edit' });
    addMemo(server, { author: 'lead', body: 'MARK-B-new', attachedTo: { kind: 'segment', textId: textB, segmentId: 's1' } });
    for (const u of live) {
      expect(has(u, 'MARK-B')).toBe(false);
      Y.applyUpdate(client, u);
    }
    expect(client.store.pendingStructs).toBeNull();
    expect(Y.encodeStateVector(client)).toEqual(Y.encodeStateVector(server));
    expect(listMemos(client).find((m) => m.id === a)?.body).toBe('MARK-A-edit');

    // the client's own edit goes back and lands on the server as usual
    const mine = addMemo(client, { author: 'trainee', body: 'MARK-own', attachedTo: { kind: 'text', textId: textA } });
    Y.applyUpdate(server, Y.encodeStateAsUpdate(client, Y.encodeStateVector(server)));
    expect(server.store.pendingStructs).toBeNull();
    expect(listMemos(server).map((m) => m.id)).toContain(mine);
  });

  it('withholds another participant’s segment jottings during the independent phase, replies with them', () => {
    const doc = new Y.Doc({ gc: false });
    const theirs = addMemo(doc, { author: 'coder2', kind: 'jotting', body: 'x', attachedTo: { kind: 'segment', textId: textA, segmentId: 's' } });
    const reply = addReply(doc, theirs, { author: 'lead', body: 'y' });
    const own = addMemo(doc, { author: 'coder', kind: 'jotting', body: 'z', attachedTo: { kind: 'segment', textId: textA, segmentId: 't' } });
    const during = view({ userId: 'coder', texts: null, othersLayers: true, independent: { [textA]: ['coder', 'coder2'] } });
    const after = view({ userId: 'coder', texts: null, othersLayers: true });
    const lead = view({ userId: 'lead', texts: null, othersLayers: true, independent: { [textA]: ['coder', 'coder2'] } });
    expect(mayReadEntry(during, entryFacts(doc, theirs))).toBe(false);
    expect(mayReadEntry(during, entryFacts(doc, reply))).toBe(false);
    expect(mayReadEntry(during, entryFacts(doc, own))).toBe(true);
    expect(mayReadEntry(after, entryFacts(doc, theirs))).toBe(true);
    // nobody but its coder reads a participant's round layer while the round is independent
    expect(mayReadEntry(lead, entryFacts(doc, theirs))).toBe(false);
  });
});
