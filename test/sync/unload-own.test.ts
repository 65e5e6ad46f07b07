/**
 * A room's unload waits for its own document only (issue 13): on PostgreSQL, another room's commit
 * held by a row lock (SELECT … FOR UPDATE on its document row blocks the update log's foreign-key
 * check, PostgreSQL docs §13.3.2) does not hold up unloading this room, whose own commits and
 * projection are done. Real store, real projector, stock y-websocket clients.
 */
import { openDatabase, type Database } from '@gloss/db';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createProjector, withProjection } from '../../apps/server/src/projection/index.js';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import { freshPostgresDatabase, type FreshPostgres } from '../support/postgres.js';
import { seedDocuments } from './support/fixtures.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor } from './support/harness.js';

describe.skipIf(!process.env.DATABASE_URL)('unloading a room on PostgreSQL', () => {
  let fresh: FreshPostgres;
  let database: Database;

  beforeAll(async () => {
    fresh = await freshPostgresDatabase();
    database = await openDatabase({ databaseUrl: fresh.url, maxConnections: 5 });
  });
  afterAll(async () => {
    await database?.close();
    await fresh?.drop();
  });

  it('does not wait for another room’s commit that a lock holds', async () => {
    const { userId, docIds } = await seedDocuments(database, 2);
    const [a, b] = docIds as [string, string];
    const logStore = createPgUpdateStore(database, { compactMinBytes: 0 });
    const projector = createProjector({ db: database.db, store: logStore, delayMs: 10 });
    const store = withProjection(logStore, projector);
    const server = await startSyncServer({ store, authorizer: testAuthorizer(new Set([a, b]), userId) });
    const locker = postgres(fresh.url, { max: 1, onnotice: () => undefined });
    let unlock!: () => void;
    const unlocked = new Promise<void>((resolve) => (unlock = resolve));
    let locked!: () => void;
    const holding = new Promise<void>((resolve) => (locked = resolve));
    let lockTx: Promise<unknown> | null = null;
    const clientA = connectClient(server.url, a);
    const clientB = connectClient(server.url, b);
    try {
      await waitFor(() => clientA.provider.synced && clientB.provider.synced, 'both synced');
      clientA.doc.getText('text').insert(0, 'alpha');
      await waitFor(async () => (await logStore.since(a, 0)).updates.length > 0, 'a committed');

      lockTx = locker.begin(async (tx) => {
        await tx`select id from documents where id = ${b} for update`;
        locked();
        await unlocked;
      });
      await holding;
      clientB.doc.getText('text').insert(0, 'beta');
      await waitFor(() => server.sync.stats().commitQueue.queued === 1, 'b’s commit is held by the lock');

      clientA.destroy();
      await waitFor(() => server.sync.stats().rooms === 1, 'room a unloaded');
      // b's commit is still held: a's unload did not wait for it.
      expect(server.sync.stats().commitQueue.queued).toBe(1);
      expect(server.sync.stats().byState).toMatchObject({ open: 1, unloading: 0 });

      unlock();
      await lockTx;
      await waitFor(async () => (await logStore.since(b, 0)).updates.length > 0, 'b committed after the lock');
    } finally {
      unlock();
      await lockTx?.catch(() => {});
      await locker.end({ timeout: 5 });
      clientA.destroy();
      clientB.destroy();
      await server.close();
      await store.close();
    }
  });
});
