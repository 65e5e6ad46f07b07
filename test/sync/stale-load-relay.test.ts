/**
 * A load that ends after its load timeout lets go of what it took (room.ts: the room releases its relay
 * subscription). By then a newer room of the same name may have subscribed: the stale room's leave must
 * not end the newer room's subscription, or the newer room hears nothing another node relays and only
 * converges through the periodic catch-up (here off: catchUpIntervalMs 0, so only the relay can carry
 * the message; the update is in no store). Two nodes of each relay: the server's and another, with
 * real Redis relays (REDIS_URL) and in-memory ones (memory-relay.ts). Before each subscriber had its
 * own subscription (RelaySubscription), the stale leave ended the newer room's and this failed.
 */
import { afterEach, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import type { Relay, UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import { createMemoryRelayHub, createRedisRelay } from '../../apps/server/src/relay/index.js';
import { encodeRelayFrame } from '../../apps/server/src/sync/relay-frame.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor } from './support/harness.js';

const url = process.env.REDIS_URL;

/** An update another node committed: a text insert by a document of its own. */
function otherNodesUpdate(text: string): Uint8Array {
  const doc = new Y.Doc();
  doc.getText('text').insert(0, text);
  return Y.encodeStateAsUpdate(doc);
}

/** Two nodes of a relay: `here` serves the room, `there` publishes as another node. */
const relays: { name: string; enabled: boolean; start: () => Promise<{ here: Relay; there: Relay }> }[] = [
  {
    name: 'in-memory relay',
    enabled: true,
    start: async () => {
      const hub = createMemoryRelayHub();
      return { here: hub.node(), there: hub.node() };
    },
  },
  { name: 'Redis relay', enabled: url !== undefined, start: async () => ({ here: await createRedisRelay(url!), there: await createRedisRelay(url!) }) },
];

describe.each(relays.filter((r) => r.enabled))('a load that ends after its timeout, with a newer room of the same name open ($name)', ({ start }) => {
  const closers: (() => Promise<void>)[] = [];
  afterEach(async () => {
    for (const close of closers.splice(0).reverse()) await close();
  });

  it('leaves the newer room subscribed: another node’s message still reaches it', async () => {
    const room = `stale-load-${Date.now()}`;
    const { here, there } = await start();
    closers.push(() => here.close(), () => there.close());
    // Tells the test when the stale room's leave has been carried out.
    let left!: () => void;
    const staleLeft = new Promise<void>((resolve) => (left = resolve));
    const relay: Relay = {
      ...here,
      async subscribe(name, onMessage) {
        const subscription = await here.subscribe(name, onMessage);
        return {
          async unsubscribe() {
            await subscription.unsubscribe();
            left(); // the first leave of the room is the stale one's: the newer room stays open
          },
        };
      },
    };
    const inner = createMemoryUpdateStore();
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    let loads = 0;
    const store: UpdateStore = {
      ...inner,
      async load(docId) {
        const loaded = await inner.load(docId);
        if (++loads === 1) await held; // the first load outlives its timeout
        return loaded;
      },
    };
    const server = await startSyncServer({ store, relay, catchUpIntervalMs: 0, authorizer: testAuthorizer(new Set([room]), 'u1'), budgets: { roomLoadTimeoutMs: 500 } });
    closers.push(() => server.close());

    await expect(server.sync.state(room, 0)).rejects.toMatchObject({ code: 'load-timeout' });
    const client = connectClient(server.url, room);
    closers.push(async () => client.destroy());
    await waitFor(() => client.provider.synced, 'the newer room open and its client synced');
    expect(loads).toBe(2);

    release(); // the stale load ends now, and its room leaves the relay
    await staleLeft;
    await there.publish(room, encodeRelayFrame({ kind: 'update', seq: 1, data: otherNodesUpdate('from the other node') }));
    await waitFor(() => client.doc.getText('text').toString() === 'from the other node', 'the relayed update reached the newer room');
  });
});
