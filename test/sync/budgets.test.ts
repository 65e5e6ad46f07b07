/**
 * Sync budgets over real sockets (issue 13): each limit answers with a clean close code (RFC 6455
 * §7.4.1: 1008 policy violation, 1013 try again later) or a 429 at the upgrade, and a log line; the
 * commit queue pushes back by pausing socket reads, not by closing. Messages per y-protocols 1.0.7
 * (sync.js: messageYjsUpdate = 2 under messageSync = 0). Rooms run on the in-memory store, which can
 * hold its commits (memory-update-store.ts) — a real database's lock, without the database.
 */
import * as encoding from 'lib0/encoding';
import { describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import * as Y from 'yjs';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import type { UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor, type TestServer } from './support/harness.js';

interface Raw {
  ws: WebSocket;
  opened: Promise<void>;
  /** The close code and reason, or the HTTP status when the upgrade was refused. */
  ended: Promise<{ code: number; reason: string } | { status: number }>;
  firstMessage: Promise<void>;
}

function raw(server: TestServer, room: string, params = ''): Raw {
  const ws = new WebSocket(`${server.url}/${room}${params}`);
  ws.on('error', () => {});
  const opened = new Promise<void>((resolve) => ws.once('open', () => resolve()));
  const firstMessage = new Promise<void>((resolve) => ws.once('message', () => resolve()));
  const ended = new Promise<{ code: number; reason: string } | { status: number }>((resolve) => {
    ws.once('unexpected-response', (_req, res) => resolve({ status: res.statusCode ?? 0 }));
    ws.once('close', (code, reason) => resolve({ code, reason: reason.toString() }));
  });
  return { ws, opened, ended, firstMessage };
}

/** A sync-update message carrying `update`. */
function updateMessage(update: Uint8Array): Uint8Array {
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, 0);
  encoding.writeVarUint(e, 2);
  encoding.writeVarUint8Array(e, update);
  return encoding.toUint8Array(e);
}

/** `n` separate one-character updates by one client. */
function typed(n: number): Uint8Array[] {
  const doc = new Y.Doc();
  const out: Uint8Array[] = [];
  doc.on('update', (u: Uint8Array) => out.push(u));
  for (let i = 0; i < n; i++) doc.getText('text').insert(i, 'x');
  return out;
}

/** A log that remembers warn lines (each refusal logs one). */
function recordingLogger() {
  const lines: string[] = [];
  return { lines, logger: { warn: (_o: object, msg?: string) => lines.push(msg ?? ''), error: (_o: object, msg?: string) => lines.push(msg ?? '') } };
}

const ROOMS = new Set(['b1', 'b2', 'b3']);

describe('connections per person and per address', () => {
  it('answers 429 past the per-person limit, and frees the place when one closes', async () => {
    const log = recordingLogger();
    const server = await startSyncServer({ store: createMemoryUpdateStore(), authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxConnectionsPerUser: 2 }, logger: log.logger });
    try {
      const a = raw(server, 'b1');
      const b = raw(server, 'b2');
      await Promise.all([a.opened, b.opened]);
      expect(await raw(server, 'b1').ended).toEqual({ status: 429 });
      // Another person from the same address still gets in.
      const other = raw(server, 'b1', '?user=u2');
      await other.opened;
      expect(log.lines).toContain('sync connection refused: too many for one person (429)');
      a.ws.close();
      await waitFor(() => server.sync.stats().connections === 2, 'a gone');
      const again = raw(server, 'b3');
      await again.opened;
      for (const r of [b, other, again]) r.ws.close();
    } finally {
      await server.close();
    }
  });

  it('answers 429 past the per-address limit, whoever signs in', async () => {
    const log = recordingLogger();
    const server = await startSyncServer({ store: createMemoryUpdateStore(), authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxConnectionsPerAddress: 2 }, logger: log.logger });
    try {
      const a = raw(server, 'b1', '?user=u1');
      const b = raw(server, 'b1', '?user=u2');
      await Promise.all([a.opened, b.opened]);
      expect(await raw(server, 'b1', '?user=u3').ended).toEqual({ status: 429 });
      expect(log.lines).toContain('sync connection refused: too many from one address (429)');
      a.ws.close();
      b.ws.close();
    } finally {
      await server.close();
    }
  });
});

describe('messages per second', () => {
  it('closes a connection that sends past its burst with 1008, and only that one', async () => {
    const log = recordingLogger();
    // 1 per second after a burst of 5: 100 messages in one go cannot all fit, however slow the machine.
    const server = await startSyncServer({ store: createMemoryUpdateStore(), authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxMessagesPerSecond: 1, messageBurst: 5 }, logger: log.logger });
    const calm = connectClient(server.url, 'b1');
    try {
      const loud = raw(server, 'b1');
      await loud.firstMessage;
      for (let i = 0; i < 100; i++) loud.ws.send(new Uint8Array([3])); // query-awareness
      const ended = await loud.ended;
      expect(ended).toMatchObject({ code: 1008 });
      expect(log.lines.some((l) => l.startsWith('over 1 messages per second'))).toBe(true);
      calm.doc.getText('text').insert(0, 'still here');
      await waitFor(() => calm.provider.synced && server.sync.stats().connections === 1, 'calm client unaffected');
    } finally {
      calm.destroy();
      await server.close();
    }
  });
});

/** A memory store whose loads wait for a gate. */
function slowLoads(inner = createMemoryUpdateStore()) {
  let open!: () => void;
  const gate = new Promise<void>((resolve) => (open = resolve));
  const store: UpdateStore = { ...inner, load: async (docId) => (await gate, inner.load(docId)) };
  return { store, open };
}

describe('before the room has loaded', () => {
  it('closes a connection whose backlog passes its byte budget with 1013', async () => {
    const log = recordingLogger();
    const slow = slowLoads();
    const server = await startSyncServer({ store: slow.store, authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxBacklogBytes: 4096 }, logger: log.logger });
    try {
      const r = raw(server, 'b1');
      await r.opened;
      for (let i = 0; i < 3; i++) r.ws.send(new Uint8Array(2048));
      expect(await r.ended).toMatchObject({ code: 1013 });
      expect(log.lines.some((l) => l.includes('before the document loaded'))).toBe(true);
    } finally {
      slow.open();
      await server.close();
    }
  });

  it('a load that takes longer than its timeout fails its waiters with 1013 and words; a later load works', async () => {
    const log = recordingLogger();
    const slow = slowLoads();
    const server = await startSyncServer({ store: slow.store, authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { roomLoadTimeoutMs: 50 }, logger: log.logger });
    try {
      const waiters = [raw(server, 'b1'), raw(server, 'b1')];
      for (const w of waiters) expect(await w.ended).toEqual({ code: 1013, reason: 'document did not load within 50 ms' });
      expect(log.lines).toContain('document did not load within 50 ms');
      await waitFor(() => server.sync.stats().rooms === 0, 'failed room forgotten');
      slow.open();
      const c = connectClient(server.url, 'b1');
      await waitFor(() => c.provider.synced, 'a fresh load succeeds');
      c.destroy();
    } finally {
      await server.close();
    }
  });
});

describe('the commit queue', () => {
  it('pauses the sender’s reads while the queue is deep and resumes them once it drains; nothing is lost', async () => {
    const store = createMemoryUpdateStore();
    const server = await startSyncServer({ store, authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxCommitQueue: 4 } });
    try {
      const r = raw(server, 'b1');
      await r.firstMessage;
      const updates = typed(7);
      const release = store.holdCommits();
      for (const u of updates.slice(0, 5)) r.ws.send(updateMessage(u));
      await waitFor(() => server.sync.stats().commitQueue.queued === 5, 'five waiting for their commit');
      expect(server.sync.stats().commitQueue.pausedSenders).toBe(1);
      release();
      await waitFor(() => server.sync.stats().commitQueue.queued === 0, 'drained');
      expect(server.sync.stats().commitQueue.pausedSenders).toBe(0);
      // Reading again: the next updates land too.
      for (const u of updates.slice(5)) r.ws.send(updateMessage(u));
      await waitFor(() => store.rows('b1').length === 7, 'all seven stored');
      const doc = new Y.Doc();
      for (const u of store.rows('b1')) Y.applyUpdate(doc, u);
      expect(doc.getText('text').toString()).toBe('xxxxxxx');
      r.ws.close();
    } finally {
      await server.close();
    }
  });

  it('refuses a sender with 1013 once the queue is at twice its limit (each paused sender still added its own)', async () => {
    const store = createMemoryUpdateStore();
    const log = recordingLogger();
    const server = await startSyncServer({ store, authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxCommitQueue: 2 }, logger: log.logger });
    const release = store.holdCommits();
    try {
      // Five writers, one update each, one after another: the queue is deep from the second on (each
      // sender pauses after its own), and the fifth would take it past twice the limit.
      const writers = Array.from({ length: 5 }, (_, i) => raw(server, 'b1', `?user=w${i}`));
      const updates = typed(5);
      for (const [i, w] of writers.entries()) {
        await w.firstMessage;
        w.ws.send(updateMessage(updates[i]!));
        if (i < 4) await waitFor(() => server.sync.stats().commitQueue.queued === i + 1, `writer ${i} queued`);
      }
      expect(await writers[4]!.ended).toMatchObject({ code: 1013 });
      expect(log.lines).toContain('the server is busy storing updates; try again later');
      expect(server.sync.stats().commitQueue).toMatchObject({ queued: 4, pausedSenders: 3 });
      release();
      await waitFor(() => store.rows('b1').length === 4, 'the four admitted are stored');
      for (const w of writers) w.ws.close();
    } finally {
      release();
      await server.close();
    }
  });
});

describe('bytes pending per connection', () => {
  it('closes a connection with 1013 when its updates waiting for their commit pass its byte budget', async () => {
    const store = createMemoryUpdateStore();
    const log = recordingLogger();
    const server = await startSyncServer({ store, authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxPendingBytesPerConnection: 64 * 1024 }, logger: log.logger });
    const release = store.holdCommits();
    const calm = connectClient(server.url, 'b1', { user: 'calm' });
    try {
      await waitFor(() => calm.provider.synced, 'calm synced');
      const r = raw(server, 'b1');
      await r.firstMessage;
      // Three updates of 30 KiB each (one long insert per update).
      const doc = new Y.Doc();
      const big: Uint8Array[] = [];
      doc.on('update', (u: Uint8Array) => big.push(u));
      for (let i = 0; i < 3; i++) doc.getText('text').insert(0, 'y'.repeat(30 * 1024));
      for (const u of big) r.ws.send(updateMessage(u));
      expect(await r.ended).toMatchObject({ code: 1013 });
      expect(log.lines).toContain('over 65536 bytes of updates waiting to be stored');
      release();
      // The two admitted before the refusal are stored and reach the calm client.
      await waitFor(() => calm.doc.getText('text').length === 60 * 1024, 'calm client has the admitted text');
    } finally {
      release();
      calm.destroy();
      await server.close();
    }
  });
});

describe('loaded documents per node', () => {
  it('unloads the least recently used idle room to make space, and refuses a new room when none is idle', async () => {
    const log = recordingLogger();
    const server = await startSyncServer({ store: createMemoryUpdateStore(), authorizer: testAuthorizer(ROOMS, 'u1'), budgets: { maxLoadedDocuments: 2 }, logger: log.logger });
    try {
      // Two rooms held open only by an opening request's lease: idle.
      await server.sync.state('b1', 60_000);
      await server.sync.state('b2', 60_000);
      expect(server.sync.stats().byState.open).toBe(2);
      // A real connection to a third room unloads b1, the least recently used.
      const c3 = connectClient(server.url, 'b3');
      await waitFor(() => c3.provider.synced, 'b3 open');
      await waitFor(() => server.sync.stats().rooms === 2, 'b1 unloaded');
      expect(log.lines).toContain('loaded-document limit reached: unloading the least recently used idle room');
      // b2 (lease) goes for b1's comeback; then both rooms are busy and a third is refused.
      const c1 = connectClient(server.url, 'b1');
      await waitFor(() => c1.provider.synced, 'b1 open again');
      const refused = raw(server, 'b2');
      expect(await refused.ended).toMatchObject({ code: 1013 });
      expect(log.lines.some((l) => l.includes('documents open, none idle'))).toBe(true);
      c1.destroy();
      c3.destroy();
    } finally {
      await server.close();
    }
  });
});
