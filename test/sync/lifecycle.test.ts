/**
 * Room lifecycle (DESIGN.md §1, §6): load once (single-flight) before any sync reply, queue what
 * arrives meanwhile, unload after the last connection and a flush, and a connection that arrives
 * during unloading waits and then reloads cleanly. Storage failures close only the affected
 * connection (1011, RFC 6455 §7.4.1). The store is the in-memory one with gates to hold a phase open.
 */
import { describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import * as Y from 'yjs';
import type { Relay, UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import { noRelay } from '../../apps/server/src/relay/index.js';
import { connectClient, startSyncServer, testAuthorizer, waitFor } from './support/harness.js';

/** A gate: `wait()` blocks until `open()`. */
function gate() {
  let open!: () => void;
  let promise = new Promise<void>((resolve) => (open = resolve));
  return {
    wait: () => promise,
    open: () => open(),
    close: () => {
      promise = new Promise<void>((resolve) => (open = resolve));
    },
  };
}

function gatedStore() {
  const inner = createMemoryUpdateStore();
  const loadGate = gate();
  const flushGate = gate();
  loadGate.open();
  flushGate.open();
  const calls = { load: 0, flush: 0 };
  let failAppends = false;
  let failLoads = false;
  const store: UpdateStore = {
    async load(docId) {
      calls.load++;
      await loadGate.wait();
      if (failLoads) throw new Error('database unavailable');
      return inner.load(docId);
    },
    append: (docId, update, userId) => (failAppends ? Promise.reject(new Error('disk full')) : inner.append(docId, update, userId)),
    since: (docId, seq) => inner.since(docId, seq),
    async flush() {
      calls.flush++;
      await flushGate.wait();
    },
    close: () => inner.close(),
  };
  return { store, inner, loadGate, flushGate, calls, setFailAppends: (v: boolean) => (failAppends = v), setFailLoads: (v: boolean) => (failLoads = v) };
}

const closeCode = (ws: WebSocket) => new Promise<number>((resolve) => ws.on('close', (code) => resolve(code)));

describe('room lifecycle', () => {
  it('loads once for many simultaneous connections and applies edits made while loading', async () => {
    const g = gatedStore();
    const server = await startSyncServer({ store: g.store, authorizer: testAuthorizer(new Set(['r1']), 'u1') });
    g.loadGate.close();
    const clients = Array.from({ length: 5 }, () => connectClient(server.url, 'r1'));
    try {
      await waitFor(() => server.sync.stats().connections === 5, 'five connections');
      expect(server.sync.stats().byState.loading).toBe(1);
      clients[0]!.doc.getText('text').insert(0, 'typed while loading');
      // Nothing answers before the load: no client is synced yet.
      await new Promise((resolve) => setImmediate(resolve));
      expect(clients.some((c) => c.provider.synced)).toBe(false);
      g.loadGate.open();
      await waitFor(() => clients.every((c) => c.doc.getText('text').toString() === 'typed while loading'), 'all have the edit');
      expect(g.calls.load).toBe(1);
      expect(g.inner.rows('r1').length).toBeGreaterThan(0);
    } finally {
      for (const c of clients) c.destroy();
      await server.close();
    }
  });

  it('a connection arriving while the room unloads waits, then gets a freshly loaded room', async () => {
    const g = gatedStore();
    const server = await startSyncServer({ store: g.store, authorizer: testAuthorizer(new Set(['r2']), 'u1') });
    try {
      const a = connectClient(server.url, 'r2');
      await waitFor(() => a.provider.synced, 'a synced');
      a.doc.getText('text').insert(0, 'before unload');
      await waitFor(() => g.inner.rows('r2').length > 0, 'stored');
      g.flushGate.close();
      a.destroy();
      await waitFor(() => server.sync.stats().byState.unloading === 1, 'room unloading');
      const b = connectClient(server.url, 'r2');
      await waitFor(() => server.sync.stats().connections === 1, 'b connected');
      expect(b.provider.synced).toBe(false);
      expect(g.calls.load).toBe(1);
      g.flushGate.open();
      await waitFor(() => b.doc.getText('text').toString() === 'before unload', 'b sees the stored text');
      expect(g.calls.load).toBe(2);
      expect(server.sync.stats().byState).toMatchObject({ open: 1, unloading: 0 });
      b.destroy();
      await waitFor(() => server.sync.stats().rooms === 0, 'unloaded again');
    } finally {
      await server.close();
    }
  });

  it('an update the store refuses closes its sender with 1011 and reaches no one', async () => {
    const g = gatedStore();
    const server = await startSyncServer({ store: g.store, authorizer: testAuthorizer(new Set(['r3']), 'u1') });
    const reader = connectClient(server.url, 'r3');
    try {
      await waitFor(() => reader.provider.synced, 'reader synced');
      const ws = new WebSocket(`${server.url}/r3`);
      const closed = closeCode(ws);
      await new Promise((resolve) => ws.once('open', resolve));
      g.setFailAppends(true);
      const doc = new Y.Doc();
      doc.getText('text').insert(0, 'lost to a full disk');
      ws.send(new Uint8Array([0, 2, ...lengthPrefixed(Y.encodeStateAsUpdate(doc))]));
      expect(await closed).toBe(1011);
      g.setFailAppends(false);
      reader.doc.getText('text').insert(0, 'still working');
      const late = connectClient(server.url, 'r3');
      await waitFor(() => late.doc.getText('text').toString() === 'still working', 'late client has only the stored edit');
      late.destroy();
      expect(reader.doc.getText('text').toString()).toBe('still working');
    } finally {
      reader.destroy();
      await server.close();
    }
  });

  it('a failed load closes the waiting connections with 1011; the next attempt loads again', async () => {
    const g = gatedStore();
    const server = await startSyncServer({ store: g.store, authorizer: testAuthorizer(new Set(['r4']), 'u1') });
    try {
      g.setFailLoads(true);
      const ws = new WebSocket(`${server.url}/r4`);
      expect(await closeCode(ws)).toBe(1011);
      g.setFailLoads(false);
      const c = connectClient(server.url, 'r4');
      await waitFor(() => c.provider.synced, 'synced after a good load');
      c.destroy();
      expect(g.calls.load).toBe(2);
    } finally {
      await server.close();
    }
  });
});

describe('unload timeouts (issue 13)', () => {
  it('an unload whose own commits do not settle is let go after its timeout; a client arriving meanwhile waits, then gets a fresh room', async () => {
    const g = gatedStore();
    const warnings: string[] = [];
    const server = await startSyncServer({
      store: g.store,
      authorizer: testAuthorizer(new Set(['r6']), 'u1'),
      budgets: { roomUnloadTimeoutMs: 200 },
      logger: { warn: (_o, msg) => warnings.push(msg ?? ''), error: () => {} },
    });
    try {
      const a = connectClient(server.url, 'r6');
      await waitFor(() => a.provider.synced, 'a synced');
      a.doc.getText('text').insert(0, 'kept');
      await waitFor(() => g.inner.rows('r6').length > 0, 'stored');
      g.flushGate.close(); // the flush never ends
      a.destroy();
      await waitFor(() => server.sync.stats().byState.unloading === 1, 'room unloading');
      const b = connectClient(server.url, 'r6');
      await waitFor(() => b.doc.getText('text').toString() === 'kept', 'b gets the stored text from a fresh load');
      expect(warnings).toContain('room unload: own commits or projection did not settle; unloading anyway');
      expect(g.calls.load).toBe(2);
      b.destroy();
    } finally {
      g.flushGate.open();
      await server.close();
    }
  });

  it('a client rejoining a room whose unload is stuck is closed with 1013 after the timeout, in words', async () => {
    const g = gatedStore();
    let release!: () => void;
    const stuck = new Promise<void>((resolve) => (release = resolve));
    const relay: Relay = { ...noRelay(), subscribe: async () => ({ unsubscribe: () => stuck }) }; // leaving the relay hangs until released
    const server = await startSyncServer({ store: g.store, relay, authorizer: testAuthorizer(new Set(['r7']), 'u1'), budgets: { roomUnloadTimeoutMs: 100 } });
    try {
      const a = connectClient(server.url, 'r7');
      await waitFor(() => a.provider.synced, 'a synced');
      a.destroy();
      await waitFor(() => server.sync.stats().byState.unloading === 1, 'room unloading');
      const ws = new WebSocket(`${server.url}/r7`);
      const reason = new Promise<string>((resolve) => ws.on('close', (_code, r) => resolve(r.toString())));
      expect(await closeCode(ws)).toBe(1013);
      expect(await reason).toBe('the document was still closing after 100 ms; try again');
      release();
      const c = connectClient(server.url, 'r7');
      await waitFor(() => c.provider.synced, 'c synced once the unload ended');
      c.destroy();
    } finally {
      release();
      await server.close();
    }
  });
});

function lengthPrefixed(bytes: Uint8Array): number[] {
  const out: number[] = [];
  let n = bytes.length;
  while (n > 0x7f) {
    out.push((n & 0x7f) | 0x80);
    n >>>= 7;
  }
  out.push(n);
  return [...out, ...bytes];
}

describe('keepalive', () => {
  it('terminates a connection that stops answering pings and keeps one that answers', async () => {
    const server = await startSyncServer({
      store: createMemoryUpdateStore(),
      authorizer: testAuthorizer(new Set(['r5']), 'u1'),
      // Client and server share this process: a stall longer than the interval between a ping and
      // its pong would drop the polite client too; 500 ms leaves room for a loaded 2-core machine.
      pingIntervalMs: 500,
    });
    try {
      const silent = new WebSocket(`${server.url}/r5`, { autoPong: false });
      const silentClosed = closeCode(silent);
      const polite = new WebSocket(`${server.url}/r5`);
      let politeClosed = false;
      polite.on('close', () => (politeClosed = true));
      let pings = 0;
      polite.on('ping', () => pings++);
      // No close frame is sent to a dead peer: the socket is dropped (1006 on this side).
      expect(await silentClosed).toBe(1006);
      await waitFor(() => pings >= 3, 'several pings answered');
      expect(politeClosed).toBe(false);
      polite.close();
    } finally {
      await server.close();
    }
  });
});
