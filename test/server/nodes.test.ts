/**
 * Two server processes on one PostgreSQL database with Redis (DESIGN §6, "Several nodes"): an edit
 * made through node A reaches a client of node B live, and both nodes serve the same sessions.
 * Runs when DATABASE_URL and REDIS_URL are set (CI sets both); skipped otherwise.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { apiClient, signIn, webSocketWithHeaders } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);

describe.runIf(enabled)('two nodes on PostgreSQL and Redis', () => {
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<undefined>;
  const providers: WebsocketProvider[] = [];

  beforeAll(async () => {
    const redis = { REDIS_URL: process.env.REDIS_URL! };
    a = await spawnServer({ db: 'postgres', seed: seedBasic, env: redis });
    b = await spawnServer({ db: 'postgres', sameDatabaseAs: a, env: redis });
  }, 180_000); // two cold server starts, each 10-20 s here under load (spawnServer's own limit: 60 s each)
  afterAll(async () => {
    for (const p of providers) p.destroy();
    await b?.stop();
    await a?.stop();
  });

  const connect = (server: SpawnedServer<unknown>, cookie: string, room: string) => {
    const doc = new Y.Doc();
    const provider = new WebsocketProvider(server.url.replace(/^http/, 'ws') + '/sync', room, doc, {
      WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: server.url }) as never,
      disableBc: true,
    });
    providers.push(provider);
    return { doc, provider };
  };

  it('accepts a session made on node A at node B', async () => {
    const cookie = await signIn(a.url, PEOPLE.coder.email, PASSWORD);
    const me = await apiClient(b.url, cookie).call<{ id: string }>('GET', '/api/me');
    expect(me.status).toBe(200);
    expect(me.body.id).toBe(a.seeded.users.coder.id);
  }, 60_000);

  it('relays a codebook edit from a client of node A to a client of node B', async () => {
    const leadCookie = await signIn(a.url, PEOPLE.lead.email, PASSWORD);
    const coderCookie = await signIn(b.url, PEOPLE.coder.email, PASSWORD);
    const room = a.seeded.codebookRoom;
    const writer = connect(a, leadCookie, room);
    const reader = connect(b, coderCookie, room);
    await waitFor(() => writer.provider.synced && reader.provider.synced, 'both synced');
    const code = new Y.Map<unknown>();
    writer.doc.getMap('codes').set('code-shared-tools', code);
    code.set('label', 'Shared tools');
    await waitFor(() => (reader.doc.getMap('codes').get('code-shared-tools') as Y.Map<unknown> | undefined)?.get('label') === 'Shared tools', 'node B client sees the code');
  }, 60_000);
});
