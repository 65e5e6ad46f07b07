/**
 * Randomised convergence: five stock y-websocket 3.1 clients make seeded random edits (Y.Text
 * inserts/deletes, Y.Map sets) while randomly disconnecting and reconnecting; afterwards every
 * client, a fresh client and the stored log must hold the same document. The property is strong
 * eventual consistency as the Yjs CRDT promises (Nicolaescu et al., "Near Real-Time Peer-to-Peer
 * Shared Editing on Extensible Data Types", GROUP 2016). Seed: GLOSS_SEED, else random (printed on failure).
 */
import type { Database } from '@gloss/db';
import * as prng from 'lib0/prng';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createPgUpdateStore, type PgUpdateStore } from '../../apps/server/src/store/index.js';
import { openTestDatabase } from '../support/database.js';
import { seedDocuments } from './support/fixtures.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor, type TestServer } from './support/harness.js';

const CLIENTS = 5;
const STEPS = 300;

describe('randomised convergence (PGlite store)', () => {
  let database: Database;
  let store: PgUpdateStore;
  let server: TestServer;
  let room: string;

  beforeAll(async () => {
    database = await openTestDatabase('pglite');
    const fixture = await seedDocuments(database, 1);
    room = fixture.docIds[0]!;
    // A small compaction threshold makes folds happen during the run too.
    store = createPgUpdateStore(database, { compactMinBytes: 2_048 });
    server = await startSyncServer({ store, authorizer: testAuthorizer(new Set([room]), fixture.userId) });
  });

  afterAll(async () => {
    await server?.close();
    await store?.close();
    await database?.close();
  });

  it('five clients with random edits and reconnects converge with each other and the store', async () => {
    const seed = Number(process.env.GLOSS_SEED ?? Math.floor(Math.random() * 2 ** 31));
    const gen = prng.create(seed);
    const clients = Array.from({ length: CLIENTS }, () => connectClient(server.url, room, {}, new Y.Doc({ gc: false })));
    try {
      await waitFor(() => clients.every((c) => c.provider.synced), 'all synced');
      for (let step = 0; step < STEPS; step++) {
        const client = clients[prng.uint32(gen, 0, CLIENTS - 1)]!;
        const text = client.doc.getText('text');
        const roll = prng.uint32(gen, 0, 99);
        if (roll < 45) text.insert(prng.uint32(gen, 0, text.length), prng.word(gen, 1, 6));
        else if (roll < 65 && text.length > 0) {
          const at = prng.uint32(gen, 0, text.length - 1);
          text.delete(at, prng.uint32(gen, 1, Math.min(5, text.length - at)));
        } else if (roll < 85) client.doc.getMap('turns').set(`k${prng.uint32(gen, 0, 9)}`, prng.uint32(gen, 0, 1000));
        else if (roll < 93) client.provider.disconnect();
        else client.provider.connect();
        if (step % 20 === 0) await new Promise((resolve) => setImmediate(resolve));
      }
      for (const c of clients) c.provider.connect();
      // Map iteration order depends on arrival order, so compare sorted entries.
      const state = (doc: Y.Doc) => JSON.stringify([doc.getText('text').toString(), [...doc.getMap('turns').entries()].sort()]);
      await waitFor(() => clients.every((c) => c.provider.synced && state(c.doc) === state(clients[0]!.doc)), 'clients converge', 20_000).catch(
        (error: Error) => {
          const detail = clients.map((c) => `${c.provider.wsconnected}/${c.provider.synced} ${JSON.stringify([...Y.decodeStateVector(Y.encodeStateVector(c.doc))])} ${state(c.doc).length} ${JSON.stringify(c.doc.getMap("turns").toJSON())}`).join("\n");
          throw new Error(`${error.message}\n${detail}\n${JSON.stringify(server.sync.stats())}`);
        },
      );
      const fresh = connectClient(server.url, room);
      try {
        await waitFor(() => fresh.provider.synced && state(fresh.doc) === state(clients[0]!.doc), 'fresh client converges');
      } finally {
        fresh.destroy();
      }
      await store.flush();
      const loaded = await store.load(room);
      const stored = new Y.Doc({ gc: false });
      for (const u of loaded.updates) Y.applyUpdate(stored, u);
      expect(state(stored)).toBe(state(clients[0]!.doc));
      expect(Y.encodeStateVector(stored)).toEqual(Y.encodeStateVector(clients[0]!.doc));
    } catch (error) {
      throw new Error(`convergence failed with GLOSS_SEED=${seed}: ${(error as Error).message}`, { cause: error });
    } finally {
      for (const c of clients) c.destroy();
    }
  });
});
