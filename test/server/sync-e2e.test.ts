/**
 * The composed server end to end with the stock y-websocket 3.1 client (its WebSocketPolyfill sends
 * the session cookie and the page's Origin, as a browser does): a member loads the transcript that
 * text import stored as the document's first snapshot; a coder's layer edits survive a graceful
 * stop (SIGTERM) and restart; an observer's edits are refused by the server and never stored.
 * Expected behaviour: DESIGN.md §2 and §6 and the y-websocket protocol (sync step 1/2, update).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { apiClient, signIn, webSocketWithHeaders } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { waitFor } from '../support/wait.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';

describe.each(dbKinds())('sync through the composed server on %s', (kind) => {
  let server: SpawnedServer<BasicSeed>;
  const providers: WebsocketProvider[] = [];

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed: seedBasic });
  }, 120_000); // a cold server start (tsx, PGlite) took 10-20 s here under load; spawnServer's own limit is 60 s
  afterAll(async () => {
    for (const p of providers) p.destroy();
    await server?.stop();
  });

  async function open(email: string, room: string, doc = new Y.Doc()) {
    const cookie = await signIn(server.url, email, PASSWORD);
    const provider = new WebsocketProvider(server.url.replace(/^http/, 'ws') + '/sync', room, doc, {
      WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: server.url }) as never,
      disableBc: true,
    });
    providers.push(provider);
    await waitFor(() => provider.synced, `${email} synced ${room}`);
    return { doc, provider, cookie };
  }

  it('loads the imported transcript into a member’s client', async () => {
    const { doc } = await open(PEOPLE.observer.email, server.seeded.textRoom);
    expect(doc.getText('text').toString()).toContain('My neighbour lent me a spade and a plot.');
  }, 60_000);

  it('keeps a coder’s layer edits across a graceful restart and refuses an observer’s edits', async () => {
    const seed = server.seeded;
    const coderCookie = await signIn(server.url, PEOPLE.coder.email, PASSWORD);
    const detail = await apiClient(server.url, coderCookie).call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${seed.textId}`);
    const layerRoom = detail.body.layers.find((l) => l.mine)!.room;

    const coder = await open(PEOPLE.coder.email, layerRoom);
    const seg = new Y.Map<unknown>();
    coder.doc.getMap('segments').set('seg-1', seg);
    seg.set('codeId', 'code-harvest');

    const observer = await open(PEOPLE.observer.email, layerRoom);
    await waitFor(() => observer.doc.getMap('segments').has('seg-1'), 'observer sees the coder’s segment');
    // An observer's local edit: the server must not apply or store it.
    observer.doc.getMap('segments').set('seg-evil', new Y.Map());

    // A third reader, connecting now, sees the coder's segment and not the observer's.
    const reader = await open(PEOPLE.coder2.email, layerRoom);
    await waitFor(() => reader.doc.getMap('segments').has('seg-1'), 'reader has the segment');
    expect(reader.doc.getMap('segments').has('seg-evil')).toBe(false);

    for (const p of providers.splice(0)) p.destroy();
    expect(await server.kill('SIGTERM')).toBe(0);
    await server.restart();

    const after = await open(PEOPLE.coder2.email, layerRoom);
    const segments = after.doc.getMap('segments');
    expect((segments.get('seg-1') as Y.Map<unknown> | undefined)?.get('codeId')).toBe('code-harvest');
    expect(segments.has('seg-evil')).toBe(false);
  }, 120_000); // a graceful stop and a second cold start
});
