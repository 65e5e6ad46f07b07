/**
 * The sync engine against a real store (PGlite, and PostgreSQL when DATABASE_URL is set) with stock
 * y-websocket 3.1 clients: convergence, persistence before relay, read-only refusal, refused upgrades.
 * Expected behaviour follows DESIGN.md §6 and the y-websocket protocol (y-protocols sync/auth).
 */
import { updates, type Database } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import * as Y from 'yjs';
import { createPgUpdateStore, type PgUpdateStore } from '../../apps/server/src/store/index.js';
import { dbKinds, openTestDatabase } from '../support/database.js';
import { seedDocuments } from './support/fixtures.js';
import { connectClient, startSyncServer, synced, testAuthorizer, waitFor, type TestServer } from './support/harness.js';

describe.each(dbKinds())('sync engine on %s', (kind) => {
  let database: Database;
  let store: PgUpdateStore;
  let server: TestServer;
  let docIds: string[];

  beforeAll(async () => {
    database = await openTestDatabase(kind);
    const fixture = await seedDocuments(database, 4);
    docIds = fixture.docIds;
    store = createPgUpdateStore(database);
    server = await startSyncServer({ store, authorizer: testAuthorizer(new Set(docIds), fixture.userId) });
  });

  afterAll(async () => {
    await server?.close();
    await store?.close();
    await database?.close();
  });

  const logRows = async (docId: string) =>
    (await database.db.select({ docId: updates.docId, data: updates.data }).from(updates)).filter((row) => row.docId === docId);

  it('two stock clients converge and the edits are in the log', async () => {
    const room = docIds[0]!;
    const a = connectClient(server.url, room);
    const b = connectClient(server.url, room);
    try {
      await synced(a.provider);
      await synced(b.provider);
      a.doc.getText('text').insert(0, 'We met at the allotment every Sunday.');
      b.doc.getMap('turns').set('t1', 'Speaker A');
      await waitFor(
        () => b.doc.getText('text').toString() === a.doc.getText('text').toString() && a.doc.getMap('turns').get('t1') === 'Speaker A',
        'both edits on both clients',
      );
      await store.flush();
      const stored = new Y.Doc();
      for (const row of await logRows(room)) Y.applyUpdate(stored, row.data);
      expect(stored.getText('text').toString()).toBe('We met at the allotment every Sunday.');
      expect(stored.getMap('turns').get('t1')).toBe('Speaker A');
    } finally {
      a.destroy();
      b.destroy();
    }
  });

  it('a late joiner receives the stored state after the room unloaded', async () => {
    const room = docIds[1]!;
    const a = connectClient(server.url, room);
    await synced(a.provider);
    a.doc.getText('text').insert(0, 'first session');
    await waitFor(async () => (await logRows(room)).length > 0, 'update stored');
    a.destroy();
    await waitFor(() => server.sync.stats().rooms === 0, 'room unloaded');
    const b = connectClient(server.url, room);
    try {
      await waitFor(() => b.doc.getText('text').toString() === 'first session', 'late joiner has the text');
    } finally {
      b.destroy();
    }
  });

  it("an observer's update is refused: not applied, not relayed, not stored", async () => {
    const room = docIds[2]!;
    const coder = connectClient(server.url, room);
    const observer = connectClient(server.url, room, { as: 'observer' });
    const denied: string[] = [];
    const warn = console.warn;
    try {
      await synced(coder.provider);
      await waitFor(() => observer.provider.wsconnected, 'observer connected');
      console.warn = (msg: string) => denied.push(String(msg));
      observer.doc.getText('text').insert(0, 'should not travel');
      coder.doc.getText('text').insert(0, 'coder text');
      await waitFor(() => observer.doc.getText('text').toString().includes('coder text'), 'observer still receives');
      await waitFor(() => denied.some((m) => m.includes('Permission denied')), 'client told permission denied');
      await store.flush();
      const stored = new Y.Doc();
      for (const row of await logRows(room)) Y.applyUpdate(stored, row.data);
      expect(stored.getText('text').toString()).toBe('coder text');
      expect(coder.doc.getText('text').toString()).toBe('coder text');
      expect(observer.provider.wsconnected).toBe(true);
    } finally {
      console.warn = warn;
      coder.destroy();
      observer.destroy();
    }
  });

  it('refuses unknown rooms with 404 and denied requests with 403 at the upgrade', async () => {
    const status = (path: string) =>
      new Promise<number>((resolve, reject) => {
        const ws = new WebSocket(`${server.url}/${path}`);
        ws.on('unexpected-response', (_req, res) => resolve(res.statusCode ?? 0));
        ws.on('open', () => reject(new Error('upgrade accepted')));
        ws.on('error', () => {});
      });
    expect(await status('no-such-room')).toBe(404);
    expect(await status(`${docIds[3]}?deny=1`)).toBe(403);
  });
});
