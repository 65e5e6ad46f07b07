/**
 * Issue 13, the failover bug: a client that moves to a node whose memos room has not caught up with
 * the log resends what it received on the other node — others' memos, committed there — together with
 * its own edits. The own-memos rule used to judge that whole message against the node's stale room and
 * refuse it ("someone else's memo"), own edits included. Now a refused restricted write is judged again
 * once the room has read the log (sync/connection.ts): what is already committed changes nothing, and
 * only the client's own edits are judged.
 * Two real server processes on one PostgreSQL database and no Redis: nothing is relayed and the second
 * node never catches up by itself (no relay, no periodic read), which is the "not yet caught up" moment
 * made to last. Stock y-websocket 3.1 clients. Expected behaviour: the project's own rule (DESIGN §6,
 * memos are each person's own; issue 13 item 9: a node failure loses nobody's writes).
 * Needs DATABASE_URL (CI sets it: then this runs, never skips).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { addMemo, listMemos } from '@gloss/model';
import { webSocketWithHeaders } from '../support/http.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { cookieFor } from '../sync/support/remote.js';

const enabled = Boolean(process.env.DATABASE_URL);

describe.runIf(enabled)('failing over to a node that is behind the log', () => {
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<undefined>;
  const providers: WebsocketProvider[] = [];

  beforeAll(async () => {
    // no REDIS_URL: the two nodes share the database only
    a = await spawnServer({ db: 'postgres', seed: seedBasic, startTimeoutMs: 180_000 });
    b = await spawnServer({ db: 'postgres', sameDatabaseAs: a, startTimeoutMs: 180_000 });
  }, 400_000);
  afterAll(async () => {
    for (const p of providers) p.destroy();
    await b?.stop();
    await a?.stop();
  });

  function connect(url: string, cookie: string, room: string, doc: Y.Doc) {
    const denied: string[] = [];
    const provider = new WebsocketProvider(`${url.replace(/^http/, 'ws')}/sync`, room, doc, {
      WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: url }) as never,
      disableBc: true,
    });
    // y-websocket logs a permission-denied message; keep its words
    (provider as unknown as { messageHandlers: Array<(e: unknown, d: { arr: Uint8Array; pos: number }) => void> }).messageHandlers[2] = (_e, d) => {
      denied.push(Buffer.from(d.arr.subarray(d.pos)).toString('utf8'));
    };
    providers.push(provider);
    return { provider, denied };
  }
  const titles = (doc: Y.Doc) => listMemos(doc).map((m) => m.title);

  it('the resend of others’ committed memos is not refused, and the mover’s own memo lands', async () => {
    const s = a.seeded;
    const [lead, coder, coder2] = await Promise.all([cookieFor(a.url, 'lead'), cookieFor(a.url, 'coder'), cookieFor(b.url, 'coder2')]);
    // node B's memos room is loaded (and stays: a watcher is on it) before anything below is written
    const watcherDoc = new Y.Doc({ gc: false });
    const watcher = connect(b.url, coder2, s.memosRoom, watcherDoc);
    await waitFor(() => watcher.provider.synced, 'watcher synced on node B');

    // The lead writes on node A; the coder, also on node A, receives it.
    const leadDoc = new Y.Doc({ gc: false });
    const onA = connect(a.url, lead, s.memosRoom, leadDoc);
    const coderDoc = new Y.Doc({ gc: false });
    const coderOnA = connect(a.url, coder, s.memosRoom, coderDoc);
    await waitFor(() => onA.provider.synced && coderOnA.provider.synced, 'lead and coder synced on node A');
    addMemo(leadDoc, { author: s.users.lead.id, title: 'lead-on-A', attachedTo: { kind: 'study' } });
    await waitFor(() => titles(coderDoc).includes('lead-on-A'), 'the coder received the lead’s memo on node A');
    expect(titles(watcherDoc)).not.toContain('lead-on-A'); // node B is behind: nothing relays it

    // Node A is lost to the coder: they write offline, then connect to node B with the same document.
    coderOnA.provider.destroy();
    addMemo(coderDoc, { author: s.users.coder.id, title: 'coder-own', attachedTo: { kind: 'study' } });
    const moved = connect(b.url, coder, s.memosRoom, coderDoc);
    await waitFor(() => titles(watcherDoc).includes('coder-own'), 'the coder’s own memo reached node B’s room and its other client');
    expect(moved.denied).toEqual([]);
    // node B read the log to judge the resend, so it now holds the lead's memo too
    expect(titles(watcherDoc)).toContain('lead-on-A');

    // A real forgery is still refused after the catch-up: the coder editing the lead's memo.
    const leadMemo = (coderDoc.getMap('memos') as Y.Map<Y.Map<unknown>>).get(listMemos(coderDoc).find((m) => m.title === 'lead-on-A')!.id)!;
    leadMemo.set('title', 'forged');
    await waitFor(() => moved.denied.length > 0, 'the forged edit is refused');
    expect(moved.denied[0]).toContain('your own memos');
    expect(titles(watcherDoc)).not.toContain('forged');
  }, 120_000);
});
