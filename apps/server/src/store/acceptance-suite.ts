/**
 * The update store's acceptance suite: one function that any UpdateStore runs (as a storage adapter's
 * conformance tests are run against each adapter). acceptance.test.ts runs it against the memory store,
 * PGlite and PostgreSQL. What it holds a store to (DESIGN §6: "written before the update is relayed to
 * anyone"; compaction "inside one transaction"; catch-up "so a lost message is recovered"):
 *   1. an append held open stays invisible to every other client until it commits;
 *   2. compaction racing appends (on a PostgreSQL pool: several connections, two nodes) loses nothing;
 *   3. a fold during catch-up: a reader that catches up while the log is folded still gets everything;
 *   4. a failed commit closes only its sender (1011), and the client's resend lands.
 * Sync runs for real (attachSync on an http.Server) with stock y-websocket clients.
 * Expected document contents come from Yjs itself (the same updates applied to a fresh Y.Doc).
 */
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { noRelay } from '../relay/no-relay.js';
import type { RoomAuthorizer, UpdateStore } from '../sync/contracts.js';
import { attachSync, type SyncHandle } from '../sync/index.js';

/** One store under test on a fresh log, with what the suite needs to provoke each case for real. */
export interface StoreUnderTest {
  store: UpdateStore;
  /** Documents (UUIDs) ready to be written, at least 4, and a user who may write them. */
  docIds: string[];
  userId: string;
  /** Another node's store on the same log (PostgreSQL: its own pool), or null for one-process stores. */
  peer: UpdateStore | null;
  /** Makes commits wait (a real lock where the backend has one) until the returned release resolves. */
  holdCommits(): Promise<() => Promise<void>>;
  /** The next commit fails (a real failed INSERT where the backend has one). */
  failNextCommit(): Promise<void>;
  /** Folds a document's log into its snapshot; absent where the store never folds. */
  fold?(docId: string, on?: 'peer'): Promise<unknown>;
  close(): Promise<void>;
}

const quiet = { warn: () => {}, error: () => {} };

async function waitFor(check: () => boolean | Promise<boolean>, what: string, timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for: ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

/** n one-character inserts by one client, each its own update. */
function typed(n: number, text = 'allotment '): { updates: Uint8Array[]; expected: string } {
  const doc = new Y.Doc({ gc: false });
  const updates: Uint8Array[] = [];
  doc.on('update', (u: Uint8Array) => updates.push(u));
  for (let i = 0; i < n; i++) doc.getText('text').insert(i, text[i % text.length]!);
  return { updates, expected: doc.getText('text').toString() };
}

const textOf = (updates: Uint8Array[], into = new Y.Doc({ gc: false })) => {
  for (const u of updates) Y.applyUpdate(into, u);
  return into.getText('text').toString();
};

/** attachSync on a bare http.Server over `store`; every room of `docIds` open to one writer. */
async function syncOver(store: UpdateStore, docIds: string[], userId: string): Promise<{ url: string; sync: SyncHandle; close(): Promise<void> }> {
  const authorizer: RoomAuthorizer = {
    async authorize(_req, room) {
      if (!docIds.includes(room)) throw Object.assign(new Error('no such room'), { status: 404 });
      return { room, docId: room, studyId: 'study', kind: 'text', userId, userName: 'Ines Varga', sessionId: 's', sessionExpiresAt: new Date(Date.now() + 86_400_000), role: 'coder', canWrite: true };
    },
    recheck: async (grant) => ({ ok: true, grant }),
  };
  const http: Server = createServer((_req, res) => res.writeHead(404).end());
  const sync = attachSync(http, { store, authorizer, relay: noRelay(), maxMessageBytes: 1024 * 1024, pingIntervalMs: 30_000, logger: quiet });
  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  const url = `ws://127.0.0.1:${(http.address() as AddressInfo).port}/sync`;
  return {
    url,
    sync,
    async close() {
      await sync.close();
      http.closeAllConnections();
      await new Promise<void>((resolve) => http.close(() => resolve()));
    },
  };
}

function client(url: string, room: string) {
  const doc = new Y.Doc();
  const provider = new WebsocketProvider(url, room, doc, { WebSocketPolyfill: WebSocket as never, disableBc: true, maxBackoffTime: 200 });
  const closes: number[] = [];
  provider.on('connection-close', (event: { code?: number } | null) => void closes.push(event?.code ?? 0));
  return { doc, provider, closes, text: () => doc.getText('text').toString(), destroy: () => provider.destroy() };
}

export function updateStoreAcceptance(name: string, open: () => Promise<StoreUnderTest>): void {
  describe(`update store acceptance: ${name}`, () => {
    let t: StoreUnderTest;
    beforeAll(async () => {
      t = await open();
    }, 120_000);
    afterAll(async () => t?.close());

    it('an append held open stays invisible to every other client until it commits', async () => {
      const docId = t.docIds[0]!;
      const server = await syncOver(t.store, t.docIds, t.userId);
      const a = client(server.url, docId);
      const b = client(server.url, docId);
      let release: (() => Promise<void>) | null = null;
      try {
        await waitFor(() => a.provider.synced && b.provider.synced, 'both clients synced');
        release = await t.holdCommits();
        a.doc.getText('text').insert(0, 'held open');
        // Presence is not held: once b has a's mark, the server has handled a's update message before it.
        a.provider.awareness.setLocalStateField('mark', 1);
        await waitFor(() => (b.provider.awareness.getStates().get(a.doc.clientID) as { mark?: number } | undefined)?.mark === 1, 'b sees a’s presence');
        expect(b.text()).toBe('');
        const c = client(server.url, docId); // a newcomer is greeted from the room, which has not applied it
        try {
          await waitFor(() => c.provider.synced, 'newcomer synced');
          expect(c.text()).toBe('');
          if (t.peer) expect(textOf((await t.peer.since(docId, 0)).updates)).toBe(''); // another node reading the log
          await release();
          release = null;
          await waitFor(() => b.text() === 'held open' && c.text() === 'held open', 'everyone has it once committed');
          if (t.peer) expect(textOf((await t.peer.since(docId, 0)).updates)).toBe('held open');
        } finally {
          c.destroy();
        }
      } finally {
        if (release) await release();
        a.destroy();
        b.destroy();
        await server.close();
      }
    }, 60_000);

    it('compaction racing appends (from two nodes where there are two) loses nothing', async () => {
      const docId = t.docIds[1]!;
      const { updates, expected } = typed(600);
      await t.store.load(docId);
      const writers = t.peer ? [t.store, t.peer] : [t.store];
      const appends = Promise.all(updates.map((u, i) => writers[i % writers.length]!.append(docId, u, null)));
      let folds = 0;
      let done = false;
      void appends.finally(() => (done = true));
      // fold from both nodes over and over while the appends land
      while (!done && t.fold) {
        await Promise.all([t.fold(docId), ...(t.peer ? [t.fold(docId, 'peer')] : [])]);
        folds++;
        // A fold that settles in microtasks alone (PGlite runs in this process) would starve the appends' timers,
        // and the test's own timeout, for ever: give the event loop a turn each time round.
        await new Promise((resolve) => setImmediate(resolve));
      }
      await appends;
      if (t.fold) await t.fold(docId);
      const loaded = await t.store.load(docId);
      expect(textOf(loaded.updates)).toBe(expected);
      if (t.peer) expect(textOf((await t.peer.load(docId)).updates)).toBe(expected);
      if (t.fold) expect(folds).toBeGreaterThan(0);
    }, 120_000);

    it('a fold during catch-up: a reader catching up while the log folds still gets everything', async () => {
      const docId = t.docIds[2]!;
      const { updates, expected } = typed(240);
      const reader = new Y.Doc({ gc: false });
      const first = await t.store.load(docId);
      textOf(first.updates, reader);
      let cursor = first.seq;
      const reading = t.peer ?? t.store; // another node catches up where there is one
      for (let round = 0; round < 6; round++) {
        const batch = updates.slice(round * 40, round * 40 + 40);
        await Promise.all(batch.map((u) => t.store.append(docId, u, null)));
        // the catch-up read and the fold start together; either order must leave the reader whole
        const [caught] = await Promise.all([reading.since(docId, cursor), t.fold?.(docId)]);
        textOf(caught.updates, reader);
        cursor = caught.seq;
        expect(reader.getText('text').toString()).toBe(textOf(updates.slice(0, round * 40 + 40)));
      }
      expect(reader.getText('text').toString()).toBe(expected);
    }, 60_000);

    it('a failed commit closes only its sender, and the client’s resend lands', async () => {
      const docId = t.docIds[3]!;
      const server = await syncOver(t.store, t.docIds, t.userId);
      const a = client(server.url, docId);
      const b = client(server.url, docId);
      try {
        await waitFor(() => a.provider.synced && b.provider.synced, 'both clients synced');
        await t.failNextCommit();
        a.doc.getText('text').insert(0, 'sent twice');
        await waitFor(() => a.closes.includes(1011), 'the sender closed with 1011 (internal error)');
        // y-websocket reconnects by itself and sends what the server lacks (sync step 1 and 2)
        await waitFor(() => b.text() === 'sent twice', 'the resend reached the other client');
        expect(b.closes).toEqual([]);
        await t.store.flush();
        expect(textOf((await t.store.load(docId)).updates)).toBe('sent twice');
      } finally {
        a.destroy();
        b.destroy();
        await server.close();
      }
    }, 60_000);
  });
}
