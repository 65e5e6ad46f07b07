/**
 * Two real server processes on one PostgreSQL database and one Redis: clients on each converge, and
 * an update that was committed but never published (written straight into the log, as if its Redis
 * message were lost) reaches clients on both nodes through the periodic catch-up from the log.
 * Needs DATABASE_URL and REDIS_URL; when they are set but unreachable this fails (it does not skip).
 */
import { openDatabase, type Database } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import { freshPostgresDatabase, type FreshPostgres } from '../support/postgres.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { addMemo, listMemos } from '@gloss/model';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from './support/harness.js';
import { cookieFor, remoteClient } from './support/remote.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);

describe.runIf(enabled)('two nodes through Redis', () => {
  let fresh: FreshPostgres;
  let database: Database;
  let seed: BasicSeed;
  const nodes: SpawnedServer<undefined>[] = [];

  beforeAll(async () => {
    fresh = await freshPostgresDatabase();
    database = await openDatabase({ databaseUrl: fresh.url, maxConnections: 2 });
    seed = await seedBasic(database.db);
    for (let i = 0; i < 2; i++) {
      nodes.push(await spawnServer({ db: 'postgres', env: { DATABASE_URL: fresh.url, REDIS_URL: process.env.REDIS_URL! } }));
    }
  }, 180_000);

  afterAll(async () => {
    for (const node of nodes) await node.stop();
    await database?.close();
    await fresh?.drop();
  });

  it('clients on different nodes converge, and a lost relay message is recovered from the log', async () => {
    const room = seed.memosRoom;
    const [n1, n2] = nodes as [SpawnedServer<undefined>, SpawnedServer<undefined>];
    const a = remoteClient(n1.url, await cookieFor(n1.url, 'coder'), room);
    const b = remoteClient(n2.url, await cookieFor(n2.url, 'coder2'), room);
    const c = remoteClient(n2.url, await cookieFor(n2.url, 'lead'), room);
    const clients = [a, b, c];
    try {
      await waitFor(() => clients.every((x) => x.provider.synced), 'all synced', 20_000);
      // The memos room takes from each person only memos of their own (checked on the server per update).
      const authors = [seed.users.coder.id, seed.users.coder2.id, seed.users.lead.id];
      for (let i = 0; i < 30; i++) addMemo(clients[i % 3]!.doc, { kind: 'memo', author: authors[i % 3]!, title: `k${i}`, body: `memo ${i} from client ${i % 3}`, attachedTo: { kind: 'study' } });
      const titles = (d: Y.Doc) => listMemos(d).map((m) => m.title).sort();
      const same = () => clients.every((x) => listMemos(x.doc).length === 30);
      await waitFor(same, 'all see 30 memos across nodes', 20_000);
      expect(titles(b.doc)).toEqual(titles(a.doc));

      // Presence crosses nodes too, and so does its removal when the connection closes.
      a.provider.awareness.setLocalStateField('user', { name: 'Rua' });
      await waitFor(() => (b.provider.awareness.getStates().get(a.doc.clientID) as { user?: { name?: string } } | undefined)?.user?.name === 'Rua', 'presence on the other node', 20_000);

      // Committed to the log by a third party and never published: only the catch-up can deliver it.
      const outsider = new Y.Doc();
      Y.applyUpdate(outsider, Y.encodeStateAsUpdate(a.doc));
      const lost: Uint8Array[] = [];
      outsider.on('update', (u: Uint8Array) => lost.push(u));
      outsider.getMap('memos').set('lost', 'recovered from the log');
      const store = createPgUpdateStore(database, { compactMinBytes: 0 });
      await store.append(room, lost[0]!, null);
      await store.close();
      await waitFor(() => clients.every((x) => x.doc.getMap('memos').get('lost') === 'recovered from the log'), 'lost update recovered on both nodes', 30_000);
      a.destroy();
      await waitFor(() => !b.provider.awareness.getStates().has(a.doc.clientID), 'presence removed on the other node', 20_000);
    } finally {
      for (const x of clients) x.destroy();
    }
  }, 120_000);
});
