/**
 * Rooms while the relay is away (the Relay contract, sync/contracts.ts: `subscribe` resolves at once
 * then, and `onReconnect` listeners are called once the subscriptions are active again). Whatever
 * another node committed while no message could cross must reach this node's room from the log when
 * the relay is back, also for a room that was still loading at that moment. The periodic catch-up is
 * off (catchUpIntervalMs 0), so only the reconnect can carry it. In-memory store; the relay is a stand-in
 * that never delivers (as a Redis that is down) and reconnects when the test says so. The same path
 * against real processes and a real Redis: test/faults/redis-down-reopen.test.ts.
 */
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import type { Relay, UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import { noRelay } from '../../apps/server/src/relay/index.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor } from './support/harness.js';

function awayRelay(): { relay: Relay; reconnect: () => void } {
  const listeners = new Set<() => void>();
  const relay: Relay = {
    ...noRelay(),
    lossy: true,
    onReconnect(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
  return { relay, reconnect: () => listeners.forEach((l) => l()) };
}

/** An update another node committed: a text insert by a document of its own. */
function otherNodesUpdate(text: string): Uint8Array {
  const doc = new Y.Doc();
  doc.getText('text').insert(0, text);
  return Y.encodeStateAsUpdate(doc);
}

describe('a room while the relay is away', () => {
  it('an open room reads what another node committed meanwhile once the relay is back', async () => {
    const inner = createMemoryUpdateStore();
    const { relay, reconnect } = awayRelay();
    const server = await startSyncServer({ store: inner, relay, catchUpIntervalMs: 0, authorizer: testAuthorizer(new Set(['r1']), 'u1') });
    const client = connectClient(server.url, 'r1');
    try {
      await waitFor(() => client.provider.synced, 'synced');
      await inner.append('r1', otherNodesUpdate('from B'), null);
      reconnect();
      await waitFor(() => client.doc.getText('text').toString() === 'from B', 'the other node’s commit arrived from the log');
    } finally {
      client.destroy();
      await server.close();
    }
  });

  it('a room loading when the relay comes back catches up once open (its load may have read before)', async () => {
    const inner = createMemoryUpdateStore();
    let read!: () => void;
    const hasRead = new Promise<void>((resolve) => (read = resolve));
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    const store: UpdateStore = {
      ...inner,
      async load(docId) {
        const loaded = await inner.load(docId);
        read();
        await held; // the load has read the log but the room is not open yet
        return loaded;
      },
    };
    const { relay, reconnect } = awayRelay();
    const server = await startSyncServer({ store, relay, catchUpIntervalMs: 0, authorizer: testAuthorizer(new Set(['r2']), 'u1') });
    const client = connectClient(server.url, 'r2');
    try {
      await hasRead;
      expect(server.sync.stats().byState.loading).toBe(1);
      await inner.append('r2', otherNodesUpdate('after the read'), null);
      reconnect();
      release();
      await waitFor(() => client.provider.synced, 'synced');
      await waitFor(() => client.doc.getText('text').toString() === 'after the read', 'the commit after the load’s read arrived from the log');
    } finally {
      client.destroy();
      await server.close();
    }
  });
});
