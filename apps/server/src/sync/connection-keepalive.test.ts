/**
 * The keepalive round (RFC 6455 §5.5.2-5.5.3: a ping is answered by a pong) on real sockets: a client
 * that stops answering ends, and one whose reads the server paused (deep commit queue) is not judged
 * until they resume, since its pong sits unread behind them.
 */
import { once } from 'node:events';
import type { AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { WebSocket, WebSocketServer } from 'ws';
import { Connection } from './connection.js';
import type { RoomGrant } from './contracts.js';

const quiet = { warn: () => undefined, error: () => undefined };
const grant: RoomGrant = {
  room: 'r', docId: 'r', studyId: 's', kind: 'text', userId: 'u', userName: 'U', sessionId: 'x',
  sessionExpiresAt: new Date(Date.now() + 3_600_000), role: 'coder', canWrite: true,
};

let close: () => Promise<void> = async () => undefined;
afterEach(() => close());

/** A server-side Connection and the client socket at the other end. */
async function pair(clientOptions: { autoPong?: boolean } = {}) {
  const wss = new WebSocketServer({ port: 0, host: '127.0.0.1' });
  await once(wss, 'listening');
  const accepted = once(wss, 'connection') as Promise<[WebSocket]>;
  const client = new WebSocket(`ws://127.0.0.1:${(wss.address() as AddressInfo).port}`, clientOptions);
  const [serverWs] = await accepted;
  await once(client, 'open');
  close = async () => {
    client.terminate();
    for (const ws of wss.clients) ws.terminate();
    await new Promise((r) => wss.close(r));
  };
  return { connection: new Connection(serverWs, grant, quiet), serverWs, client };
}

/** One ping answered: the server has read the client's pong. */
const answered = (serverWs: WebSocket) => once(serverWs, 'pong');

describe('Connection.keepalive', () => {
  it('ends a connection whose client did not answer the previous ping', async () => {
    const { connection, serverWs, client } = await pair({ autoPong: false });
    const pinged = once(client, 'ping');
    connection.keepalive();
    await pinged;
    expect(serverWs.readyState).toBe(WebSocket.OPEN);
    connection.keepalive();
    expect(serverWs.readyState).not.toBe(WebSocket.OPEN);
  });

  it('keeps a connection that answers', async () => {
    const { connection, serverWs } = await pair();
    for (let i = 0; i < 3; i++) {
      const pong = answered(serverWs);
      connection.keepalive();
      await pong;
    }
    connection.keepalive();
    expect(serverWs.readyState).toBe(WebSocket.OPEN);
  });

  it('does not judge a connection while its reads are paused, and judges it again once resumed', async () => {
    const { connection, serverWs, client } = await pair();
    const pinged = once(client, 'ping');
    connection.keepalive();
    await pinged;
    connection.pauseReads();
    // the client answers, but the server reads nothing now: without the pause rule the next round ends it
    for (let i = 0; i < 3; i++) connection.keepalive();
    expect(serverWs.readyState).toBe(WebSocket.OPEN);
    connection.resumeReads();
    connection.keepalive();
    expect(serverWs.readyState).toBe(WebSocket.OPEN);
    const pong = answered(serverWs);
    await pong;
    connection.keepalive();
    expect(serverWs.readyState).toBe(WebSocket.OPEN);
  });
});
