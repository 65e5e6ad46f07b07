/**
 * Bad input closes only the connection that sent it; awareness: one client id per connection,
 * removed on close. Close codes per RFC 6455 §7.4.1 (1003 unsupported data, 1007 invalid payload,
 * 1009 too big); message layout per y-protocols 1.0.7 (sync.js, awareness.js).
 * Pure protocol checks, so the in-memory store is used here.
 */
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import * as awarenessProtocol from 'y-protocols/awareness';
import * as syncProtocol from 'y-protocols/sync';
import * as Y from 'yjs';
import { createMemoryUpdateStore } from '../../apps/server/src/store/index.js';
import { connectClient, startSyncServer, synced, testAuthorizer, waitFor, type TestServer } from './support/harness.js';

const ROOM = 'room-abuse';
let server: TestServer;

beforeAll(async () => {
  server = await startSyncServer({
    store: createMemoryUpdateStore(),
    authorizer: testAuthorizer(new Set([ROOM, 'room-aw']), 'u1'),
    maxMessageBytes: 64 * 1024,
  });
});
afterAll(async () => server?.close());

/** A raw socket that records its close code. */
async function rawSocket(): Promise<{ ws: WebSocket; closed: Promise<number>; messages: Uint8Array[] }> {
  const ws = new WebSocket(`${server.url}/${ROOM}`);
  const messages: Uint8Array[] = [];
  ws.on('message', (data) => messages.push(new Uint8Array(data as Buffer)));
  const closed = new Promise<number>((resolve) => ws.on('close', (code) => resolve(code)));
  ws.on('error', () => {});
  await new Promise((resolve, reject) => {
    ws.once('open', resolve);
    ws.once('error', reject);
  });
  return { ws, closed, messages };
}

function message(write: (e: encoding.Encoder) => void): Uint8Array {
  const e = encoding.createEncoder();
  write(e);
  return encoding.toUint8Array(e);
}

describe('bad input closes only its own connection', () => {
  const cases: Array<[string, () => Uint8Array | string, number]> = [
    ['unknown message type', () => message((e) => encoding.writeVarUint(e, 77)), 1003],
    ['unknown sync step', () => message((e) => (encoding.writeVarUint(e, 0), encoding.writeVarUint(e, 9))), 1003],
    ['text frame', () => 'hello', 1003],
    ['truncated header', () => new Uint8Array([0x80]), 1007],
    [
      'truncated update (length says 50, 3 bytes follow)',
      () => message((e) => (encoding.writeVarUint(e, 0), encoding.writeVarUint(e, 2), encoding.writeVarUint(e, 50), encoding.writeUint8(e, 1))),
      1007,
    ],
    [
      'update bytes that are not a Yjs update',
      () => message((e) => (encoding.writeVarUint(e, 0), encoding.writeVarUint(e, 2), encoding.writeVarUint8Array(e, new Uint8Array([5, 200, 1, 2, 3])))),
      1007,
    ],
    [
      'awareness state that is not JSON',
      () =>
        message((e) => {
          encoding.writeVarUint(e, 1);
          encoding.writeVarUint8Array(
            e,
            message((a) => (encoding.writeVarUint(a, 1), encoding.writeVarUint(a, 5), encoding.writeVarUint(a, 1), encoding.writeVarString(a, '{nope'))),
          );
        }),
      1007,
    ],
    ['oversized message', () => new Uint8Array(64 * 1024 + 1), 1009],
  ];

  it.each(cases)('%s', async (_name, make, expectedCode) => {
    const bystander = connectClient(server.url, ROOM);
    try {
      await synced(bystander.provider);
      const bad = await rawSocket();
      bad.ws.send(make());
      expect(await bad.closed).toBe(expectedCode);
      // The bystander still edits through the same room, and a new client sees it.
      bystander.doc.getText('text').insert(0, `${_name}; `);
      const fresh = connectClient(server.url, ROOM);
      try {
        await waitFor(() => fresh.doc.getText('text').toString().includes(`${_name}; `), 'fresh client sees the edit');
        expect(bystander.provider.wsconnected).toBe(true);
      } finally {
        fresh.destroy();
      }
    } finally {
      bystander.destroy();
    }
  });

  it('a malformed update leaves nothing in the room for others', async () => {
    const bad = await rawSocket();
    const update = Y.encodeStateAsUpdate(withText('poison'));
    bad.ws.send(message((e) => (encoding.writeVarUint(e, 0), encoding.writeVarUint(e, 2), encoding.writeVarUint8Array(e, update.subarray(0, update.length - 3)))));
    expect(await bad.closed).toBe(1007);
    const fresh = connectClient(server.url, ROOM);
    try {
      await synced(fresh.provider);
      expect(fresh.doc.getText('text').toString()).not.toContain('poison');
    } finally {
      fresh.destroy();
    }
  });
});

describe('awareness', () => {
  it('keeps only the first client id a connection announces, and removes it when the connection closes', async () => {
    const watcher = connectClient(server.url, 'room-aw');
    await synced(watcher.provider);
    const ws = new WebSocket(`${server.url}/room-aw`);
    await new Promise((resolve) => ws.once('open', resolve));
    const own = new awarenessProtocol.Awareness(new Y.Doc());
    const other = new awarenessProtocol.Awareness(new Y.Doc());
    own.setLocalState({ user: { name: 'Ama Owusu' } });
    other.setLocalState({ user: { name: 'impostor' } });
    const send = (update: Uint8Array) => ws.send(message((e) => (encoding.writeVarUint(e, 1), encoding.writeVarUint8Array(e, update))));
    // First message names its own id; the second tries to speak for someone else as well.
    send(awarenessProtocol.encodeAwarenessUpdate(own, [own.clientID]));
    send(awarenessBytes([
      { id: own.clientID, clock: 1, state: { user: { name: 'Ama Owusu' } } },
      { id: other.clientID, clock: 1, state: { user: { name: 'impostor' } } },
    ]));
    const states = () => watcher.provider.awareness.getStates();
    try {
      await waitFor(() => states().has(own.clientID), 'watcher sees the owned id');
      // A later edit proves the second message was processed before we look for the impostor.
      send(awarenessProtocol.encodeAwarenessUpdate(other, [other.clientID]));
      own.setLocalState({ user: { name: 'Ama Owusu', cursor: 3 } });
      send(awarenessProtocol.encodeAwarenessUpdate(own, [own.clientID]));
      await waitFor(() => (states().get(own.clientID) as { user?: { cursor?: number } })?.user?.cursor === 3, 'watcher sees update');
      expect(states().has(other.clientID)).toBe(false);
      ws.close();
      await waitFor(() => !states().has(own.clientID), 'state removed after close');
    } finally {
      own.destroy();
      other.destroy();
      watcher.destroy();
    }
  });

  it('a read-only connection may still sync step 1 and read', async () => {
    const a = connectClient(server.url, 'room-aw');
    await synced(a.provider);
    a.doc.getText('text').insert(0, 'visible to readers');
    const b = connectClient(server.url, 'room-aw');
    await waitFor(() => b.doc.getText('text').toString().includes('visible'), 'server has the text');
    b.destroy();
    const ws = new WebSocket(`${server.url}/room-aw?as=observer`);
    const replies: Uint8Array[] = [];
    ws.on('message', (d) => replies.push(new Uint8Array(d as Buffer)));
    await new Promise((resolve) => ws.once('open', resolve));
    ws.send(message((e) => (encoding.writeVarUint(e, 0), syncProtocol.writeSyncStep1(e, new Y.Doc()))));
    try {
      await waitFor(() => replies.some((r) => r[0] === 0 && r[1] === 1 && readText(r).includes("visible")), "step 2 reply");
    } finally {
      ws.close();
      a.destroy();
    }
  });
});

function withText(s: string): Y.Doc {
  const doc = new Y.Doc();
  doc.getText('text').insert(0, s);
  return doc;
}

function readText(step2: Uint8Array): string {
  const decoder = decoding.createDecoder(step2);
  decoding.readVarUint(decoder);
  decoding.readVarUint(decoder);
  const doc = new Y.Doc();
  Y.applyUpdate(doc, decoding.readVarUint8Array(decoder));
  return doc.getText('text').toString();
}

/** An awareness update written field by field (y-protocols awareness.js layout). */
function awarenessBytes(entries: Array<{ id: number; clock: number; state: unknown }>): Uint8Array {
  return message((e) => {
    encoding.writeVarUint(e, entries.length);
    for (const entry of entries) {
      encoding.writeVarUint(e, entry.id);
      encoding.writeVarUint(e, entry.clock);
      encoding.writeVarString(e, JSON.stringify(entry.state));
    }
  });
}
