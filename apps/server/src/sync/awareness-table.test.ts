/**
 * Presence bookkeeping against y-protocols 1.0.7 itself: updates written by its Awareness decode here,
 * and ours apply in its applyAwarenessUpdate with the same acceptance rule (newer clock wins; an equal
 * clock wins only to remove).
 */
import { describe, expect, it } from 'vitest';
import * as awarenessProtocol from 'y-protocols/awareness';
import * as Y from 'yjs';
import { AwarenessTable, decodeAwarenessUpdate, encodeAwarenessUpdate } from './awareness-table.js';

describe('awareness table', () => {
  it('reads what y-protocols writes and writes what it reads', () => {
    const theirs = new awarenessProtocol.Awareness(new Y.Doc());
    theirs.setLocalState({ user: { name: 'Kofi' }, cursor: 12 });
    const entries = decodeAwarenessUpdate(awarenessProtocol.encodeAwarenessUpdate(theirs, [theirs.clientID]));
    expect(entries).toEqual([{ clientId: theirs.clientID, clock: theirs.meta.get(theirs.clientID)!.clock, state: JSON.stringify({ user: { name: 'Kofi' }, cursor: 12 }) }]);
    const mirror = new awarenessProtocol.Awareness(new Y.Doc());
    awarenessProtocol.applyAwarenessUpdate(mirror, encodeAwarenessUpdate(entries), 'test');
    expect(mirror.getStates().get(theirs.clientID)).toEqual({ user: { name: 'Kofi' }, cursor: 12 });
    theirs.destroy();
    mirror.destroy();
  });

  it('keeps the newer clock, removes on null, and answers the removal of a known client', () => {
    const table = new AwarenessTable();
    expect(table.apply([{ clientId: 7, clock: 2, state: '{"a":1}' }], 0)).toHaveLength(1);
    expect(table.apply([{ clientId: 7, clock: 1, state: '{"a":0}' }], 0)).toHaveLength(0); // older
    expect(table.apply([{ clientId: 7, clock: 2, state: '{"a":2}' }], 0)).toHaveLength(0); // same clock, not a removal
    expect(table.snapshot(0)).toEqual([{ clientId: 7, clock: 2, state: '{"a":1}' }]);
    expect(table.remove(7)).toEqual({ clientId: 7, clock: 3, state: 'null' });
    expect(table.remove(7)).toBeNull();
    expect(table.apply([{ clientId: 8, clock: 1, state: '{}' }], 0)).toHaveLength(1);
    expect(table.apply([{ clientId: 8, clock: 1, state: 'null' }], 0)).toHaveLength(1);
    expect(table.size).toBe(0);
  });

  it('forgets states not renewed within 30 s (clients renew every 15 s)', () => {
    const table = new AwarenessTable();
    table.apply([{ clientId: 1, clock: 1, state: '{}' }], 0);
    expect(table.snapshot(30_000)).toHaveLength(1);
    expect(table.snapshot(30_001)).toHaveLength(0);
  });

  it('rejects states that are not JSON with a typed error', () => {
    const bad = encodeAwarenessUpdate([{ clientId: 1, clock: 1, state: '{oops' }]);
    expect(() => decodeAwarenessUpdate(bad)).toThrowError(expect.objectContaining({ code: 'invalid-awareness', closeCode: 1007 }));
  });
});
