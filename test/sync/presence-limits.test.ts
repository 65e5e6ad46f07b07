/**
 * Presence (awareness) limits on the wire (issue 13 item 1): a state over the configured size closes its
 * connection with 1009 (RFC 6455 §7.4.1 "message too big") and a log line; a connection cannot take a
 * presence client id that another person's connection holds (1008 "policy violation", a log line), and
 * its close leaves that person's presence in place; the same person reconnecting takes their id over.
 * Messages are made by y-protocols 1.0.7's own Awareness (awareness.js) and stock y-websocket clients.
 * Pure protocol checks, so the in-memory store is used here.
 */
import * as encoding from 'lib0/encoding';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import * as awarenessProtocol from 'y-protocols/awareness';
import * as Y from 'yjs';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import { connectClient, startSyncServer, synced, testAuthorizer, waitFor, type TestServer } from './support/harness.js';

const ROOM = 'room-presence';
const LIMIT = 1024;
let server: TestServer;
const logs: Array<{ obj: Record<string, unknown>; msg: string | undefined }> = [];

beforeAll(async () => {
  const record = (obj: object, msg?: string) => void logs.push({ obj: obj as Record<string, unknown>, msg });
  server = await startSyncServer({
    store: createMemoryUpdateStore(),
    authorizer: testAuthorizer(new Set([ROOM]), 'u-ama'),
    maxPresenceBytes: LIMIT,
    logger: { warn: record, error: record },
  });
});
afterAll(async () => server?.close());

/** A raw socket as `user`, speaking for a y-protocols Awareness whose client id is `clientId`. */
async function presenceSocket(user: string, clientId: number, state: Record<string, unknown>) {
  const doc = new Y.Doc();
  doc.clientID = clientId;
  const awareness = new awarenessProtocol.Awareness(doc);
  awareness.setLocalState(state);
  const ws = new WebSocket(`${server.url}/${ROOM}?user=${user}`);
  ws.on('error', () => {});
  const closed = new Promise<{ code: number; reason: string }>((resolve) => ws.on('close', (code, reason) => resolve({ code, reason: reason.toString() })));
  await new Promise((resolve, reject) => {
    ws.once('open', resolve);
    ws.once('error', reject);
  });
  const send = () => {
    const e = encoding.createEncoder();
    encoding.writeVarUint(e, 1); // messageAwareness
    encoding.writeVarUint8Array(e, awarenessProtocol.encodeAwarenessUpdate(awareness, [clientId]));
    ws.send(encoding.toUint8Array(e));
  };
  return { ws, awareness, closed, send, destroy: () => (awareness.destroy(), doc.destroy(), ws.close()) };
}

const nameOf = (states: Map<number, Record<string, unknown>>, id: number) => (states.get(id) as { user?: { name?: string } } | undefined)?.user?.name;

describe('presence state size', () => {
  it('a state over the limit closes its connection with 1009 and a log line; one under it is relayed', async () => {
    const watcher = connectClient(server.url, ROOM);
    await synced(watcher.provider);
    const small = await presenceSocket('u-ama', 4101, { user: { name: 'Ama Owusu' }, note: 'x'.repeat(LIMIT - 100) });
    const big = await presenceSocket('u-bo', 4102, { user: { name: 'Bo' }, note: 'x'.repeat(LIMIT) });
    try {
      small.send();
      big.send();
      expect((await big.closed).code).toBe(1009);
      await waitFor(() => nameOf(watcher.provider.awareness.getStates(), 4101) === 'Ama Owusu', 'the state under the limit arrives');
      expect(watcher.provider.awareness.getStates().has(4102)).toBe(false);
      expect(small.ws.readyState).toBe(WebSocket.OPEN);
      expect(logs.some((l) => l.obj.code === 'presence-too-large' && /over the limit of 1024/.test(l.msg ?? ''))).toBe(true);
    } finally {
      small.destroy();
      big.destroy();
      watcher.destroy();
    }
  });
});

describe('presence client id ownership', () => {
  it('another person cannot claim a held client id, and their close leaves the holder’s presence', async () => {
    const watcher = connectClient(server.url, ROOM);
    await synced(watcher.provider);
    // the holder: a stock y-websocket client of u-ama
    const holder = connectClient(server.url, ROOM, { user: 'u-ama' });
    holder.provider.awareness.setLocalState({ user: { name: 'Ama Owusu' } });
    const id = holder.provider.awareness.clientID;
    const states = () => watcher.provider.awareness.getStates();
    try {
      await waitFor(() => nameOf(states(), id) === 'Ama Owusu', 'the holder’s presence');
      const thief = await presenceSocket('u-mallory', id, { user: { name: 'impostor' } });
      thief.send();
      const closed = await thief.closed;
      expect(closed.code).toBe(1008);
      expect(closed.reason).toMatch(/belongs to another person/);
      expect(logs.some((l) => l.obj.code === 'presence-taken' && l.obj.userId === 'u-mallory')).toBe(true);
      // the thief is gone; a later change of the holder proves everything before it was handled
      holder.provider.awareness.setLocalStateField('cursor', 7);
      await waitFor(() => (states().get(id) as { cursor?: number } | undefined)?.cursor === 7, 'the holder’s next state');
      expect(nameOf(states(), id)).toBe('Ama Owusu');
      thief.destroy();
    } finally {
      holder.destroy();
      watcher.destroy();
    }
  });

  it('the same person reconnecting takes their id over; the old socket’s close then removes nothing', async () => {
    const watcher = connectClient(server.url, ROOM);
    await synced(watcher.provider);
    const states = () => watcher.provider.awareness.getStates();
    const old = await presenceSocket('u-ama', 4201, { user: { name: 'Ama, old tab' } });
    old.send();
    await waitFor(() => nameOf(states(), 4201) === 'Ama, old tab', 'the old socket’s presence');
    const fresh = await presenceSocket('u-ama', 4201, { user: { name: 'Ama, again' } });
    // y-protocols takes a state only with a newer clock: the reconnected client counts on from its own
    fresh.awareness.setLocalState({ user: { name: 'Ama, again' } });
    fresh.send();
    try {
      await waitFor(() => nameOf(states(), 4201) === 'Ama, again', 'the reconnected presence');
      old.ws.close();
      await old.closed;
      fresh.awareness.setLocalStateField('cursor', 9);
      fresh.send();
      await waitFor(() => (states().get(4201) as { cursor?: number } | undefined)?.cursor === 9, 'a later state of the new socket');
      expect(nameOf(states(), 4201)).toBe('Ama, again');
      fresh.ws.close();
      await fresh.closed;
      await waitFor(() => !states().has(4201), 'removed when its holder leaves');
    } finally {
      old.destroy();
      fresh.destroy();
      watcher.destroy();
    }
  });
});
