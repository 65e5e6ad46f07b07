/**
 * A trainee at the wire (issue 9, "a trainee cannot open, list or receive a text not assigned to them,
 * by any route or room"): a real server process, stock y-websocket 3.1 clients. Unique markers are
 * planted in a text nobody assigned to the trainee — its words and title, a coder's segment on it, a
 * comment, and memos entries attached to it (a jotting on its words, a jotting on the coder's segment, a
 * reply, a deleted memo, one written live while the trainee is connected). Every frame the trainee's
 * sockets receive (decoded with y-protocols' message layout and Yjs' decodeUpdate, and raw) and every
 * answer of every GET route of the OpenAPI description, called with every id it may take (ZIP entries
 * unpacked, the opening's compressed states included), carries none of them, while the markers the
 * trainee may read (a memo on their assigned text, a study memo) do arrive, so the scan can see. The
 * unassigned text's rooms are refused at the upgrade. Assigning the text widens what the trainee may read
 * of the memos: their open memos socket closes with 4409 and a fresh one receives the entries; a client
 * naming the old view at its upgrade is closed with 4409 too.
 * Modelled on test/rounds/wire.test.ts. Rules: the project's own (issue 9 item 1, DESIGN §6). Statuses:
 * RFC 9110 (403/404), RFC 6455 (101; 4000–4999 left to applications, §7.4.2).
 */
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import type { Db } from '@gloss/db';
import { addMemo, addReply, addSegment, listMemos, newLayerDoc, removeMemo } from '@gloss/model';
import { addTextFromTranscript, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { upgradeStatus, webSocketWithHeaders } from '../support/http.js';
import { sweepGetRoutes } from '../support/route-sweep.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { decodeFrame, markersIn, recordingWebSocket, type Frame } from '../rounds/frames.js';
import { appendUpdate, clientFor, loadStoredDoc, seedCoding, type CodingSeed } from './support.js';

const VIEW_CHANGED = 4409; // the memos view widened: discard the copy (sync/errors.ts AppCloseCode)
const kind = process.env.DATABASE_URL ? 'postgres' : 'pglite';
const tag = randomBytes(4).toString('hex');
/** Planted in or on the unassigned text: none may reach the trainee. */
const HIDDEN = {
  words: `mk-untext-${tag}`,
  title: `mk-untitle-${tag}`,
  segment: `mk-unseg-${tag}`,
  comment: `mk-uncomment-${tag}`,
  jottingWords: `mk-unjot-${tag}`,
  jottingSegment: `mk-unsegjot-${tag}`,
  reply: `mk-unreply-${tag}`,
  deleted: `mk-undeleted-${tag}`,
  live: `mk-unlive-${tag}`,
};
/** Entries the trainee may read: they must arrive (the scan can see). */
const SEEN = { assigned: `mk-seen-assigned-${tag}`, study: `mk-seen-study-${tag}`, live: `mk-seen-live-${tag}` };

interface TraineeSeed extends CodingSeed {
  hiddenTextId: string;
  hiddenTextRoom: string;
  coderHiddenLayer: string;
  hiddenSegId: string;
}

async function seed(db: Db): Promise<TraineeSeed> {
  const s = await seedCoding(db);
  const text = await addTextFromTranscript(db, s.studyId, {
    title: `Unassigned ${HIDDEN.title}`,
    transcript: transcriptFromPlainText(`Interviewer: What grows there?\nP02: Beans, and ${HIDDEN.words} by the gate.`),
    sourceFormat: 'txt',
    createdBy: s.users.owner.id,
  });
  const textDoc = await loadStoredDoc(db, text.room);
  const at = textDoc.getText('text').toString().indexOf('Beans');
  const layer = newLayerDoc();
  const hiddenSegId = addSegment(layer, textDoc, { codeId: s.codes.place, start: at, end: at + 5, note: HIDDEN.segment });
  const coderHiddenLayer = await ensureLayer(db, s.studyId, text.id, s.users.coder.id);
  await appendUpdate(db, coderHiddenLayer, layer);
  const memos = await loadStoredDoc(db, s.memosRoom);
  addMemo(memos, { author: s.users.lead.id, kind: 'jotting', body: HIDDEN.jottingWords, attachedTo: { kind: 'text', textId: text.id } });
  const onSeg = addMemo(memos, { author: s.users.coder.id, kind: 'jotting', body: HIDDEN.jottingSegment, attachedTo: { kind: 'segment', textId: text.id, segmentId: hiddenSegId } });
  addReply(memos, onSeg, { author: s.users.lead.id, body: HIDDEN.reply });
  removeMemo(memos, addMemo(memos, { author: s.users.lead.id, body: HIDDEN.deleted, attachedTo: { kind: 'text', textId: text.id } }));
  addMemo(memos, { author: s.users.lead.id, body: SEEN.assigned, attachedTo: { kind: 'text', textId: s.codingTextId } });
  addMemo(memos, { author: s.users.lead.id, body: SEEN.study, attachedTo: { kind: 'study' } });
  await appendUpdate(db, s.memosRoom, memos);
  return { ...s, hiddenTextId: text.id, hiddenTextRoom: text.room, coderHiddenLayer, hiddenSegId };
}

interface Conn {
  doc: Y.Doc;
  provider: WebsocketProvider;
  closes: number[];
}

describe(`a trainee at the wire (one node, ${kind})`, () => {
  let server: SpawnedServer<TraineeSeed>;
  let s: TraineeSeed;
  let trainee: Awaited<ReturnType<typeof clientFor>>;
  let coder: Awaited<ReturnType<typeof clientFor>>;
  let lead: Awaited<ReturnType<typeof clientFor>>;
  const all: WebsocketProvider[] = [];
  const frames: Frame[] = [];

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed, env: { ACCESS_RECHECK_SECONDS: '0' }, startTimeoutMs: 240_000 });
    s = server.seeded;
    [trainee, coder, lead] = await Promise.all([clientFor(server.url, 'trainee'), clientFor(server.url, 'coder'), clientFor(server.url, 'lead')]);
  }, 300_000);
  afterAll(async () => {
    for (const p of all.splice(0)) p.destroy();
    await server?.stop();
  }, 60_000);

  function connect(cookie: string, room: string, record: boolean, params: Record<string, string> = {}): Conn {
    const headers = { cookie, origin: server.url };
    const Poly = record ? recordingWebSocket(headers, frames) : webSocketWithHeaders(WebSocket, headers);
    const doc = new Y.Doc({ gc: false });
    const closes: number[] = [];
    const provider = new WebsocketProvider(`${server.url.replace(/^http/, 'ws')}/sync`, room, doc, {
      WebSocketPolyfill: Poly as never,
      disableBc: true,
      params,
      shouldReconnect: (event: CloseEvent) => event.code < 4000 && event.code !== 1008,
    } as ConstructorParameters<typeof WebsocketProvider>[3]);
    provider.on('connection-close', (event) => {
      if (event) closes.push(event.code);
    });
    all.push(provider);
    return { doc, provider, closes };
  }
  const synced = (...cs: Conn[]) => waitFor(() => cs.every((c) => c.provider.synced), 'clients synced', 60_000);
  const bodies = (doc: Y.Doc) => listMemos(doc, { replies: true }).map((m) => m.body);
  const hidden = Object.values(HIDDEN);

  it('receives nothing of the unassigned text in any room, live writes included; the unassigned rooms are refused', async () => {
    for (const room of [s.hiddenTextRoom, s.coderHiddenLayer, s.hiddenTextRoom.toUpperCase()]) {
      expect(await upgradeStatus(server.url, room, { origin: server.url, cookie: trainee.cookie }), room).toBe(403);
    }
    const memos = connect(trainee.cookie, s.memosRoom, true);
    const rest = [s.codebookRoom, s.codingTextRoom].map((room) => connect(trainee.cookie, room, true));
    const coderMemos = connect(coder.cookie, s.memosRoom, false);
    await synced(memos, coderMemos, ...rest);
    expect(bodies(memos.doc)).toEqual(expect.arrayContaining([SEEN.assigned, SEEN.study]));
    expect(bodies(coderMemos.doc)).toEqual(expect.arrayContaining([HIDDEN.jottingWords, HIDDEN.jottingSegment, HIDDEN.reply]));

    // Live: the coder jots on the unassigned text, then on the assigned one; the server relays in order.
    addMemo(coderMemos.doc, { author: s.users.coder.id, kind: 'jotting', body: HIDDEN.live, attachedTo: { kind: 'text', textId: s.hiddenTextId } });
    addMemo(coderMemos.doc, { author: s.users.coder.id, kind: 'jotting', body: SEEN.live, attachedTo: { kind: 'text', textId: s.codingTextId } });
    await waitFor(() => bodies(memos.doc).includes(SEEN.live), 'the visible live jotting reaches the trainee');
    // The trainee's copy holds the server's clocks (placeholders included) and nothing pending.
    expect(memos.doc.store.pendingStructs).toBeNull();
    expect(bodies(memos.doc).some((b) => hidden.some((m) => b.includes(m)))).toBe(false);

    const kinds = new Set<string>();
    for (const f of frames) {
      const d = decodeFrame(f.bytes);
      kinds.add(d.kind);
      expect(markersIn(d.text, hidden), `decoded ${d.kind} frame in ${f.room}`).toEqual([]);
      expect(markersIn(f.bytes, hidden), `raw ${d.kind} frame in ${f.room}`).toEqual([]);
    }
    expect([...kinds]).toEqual(expect.arrayContaining(['sync-step1', 'sync-step2', 'sync-update']));
    const seenInFrames = new Set(frames.flatMap((f) => markersIn(f.bytes, Object.values(SEEN))));
    expect([...seenInFrames].sort()).toEqual(Object.values(SEEN).sort());
    console.log(`trainee: ${frames.length} frames decoded (${[...kinds].join(', ')})`);
  }, 120_000);

  it('no GET route of the OpenAPI description answers the trainee with anything of the unassigned text', async () => {
    const comment = await coder.call('POST', `/api/texts/${s.hiddenTextId}/comments`, { layer: s.coderHiddenLayer, segmentId: s.hiddenSegId, body: HIDDEN.comment });
    expect(comment.status).toBe(201);
    const spec = (await trainee.call<{ paths: Record<string, { get?: unknown }> }>('GET', '/api/openapi.json')).body;
    const rooms = [s.textRoom, s.codingTextRoom, s.hiddenTextRoom, s.codebookRoom, s.memosRoom, s.coderHiddenLayer];
    const versionIds: string[] = [];
    for (const room of rooms) {
      const v = await lead.call<Array<{ id: string }>>('GET', `/api/documents/${room}/versions`);
      if (v.status === 200) versionIds.push(...v.body.map((x) => x.id));
    }
    const none = '00000000-0000-4000-8000-000000000000';
    const values: Record<string, string[]> = {
      studyId: [s.studyId],
      textId: [s.hiddenTextId, s.codingTextId, s.textId],
      roundId: [none],
      room: rooms,
      versionId: versionIds.length ? versionIds : [none],
      userId: [s.users.trainee.id, s.users.coder.id],
      commentId: [none],
      invitationId: [none],
    };
    const queries: Record<string, string[]> = {
      '/api/texts/{textId}/comparison': [`?layer=${s.coderHiddenLayer}&reference=${s.coderHiddenLayer}`],
      '/api/studies/{studyId}/retrieval': ['?limit=500', `?limit=500&coder=${s.users.coder.id}`, `?limit=500&code=${s.codes.place}`],
      '/api/studies/{studyId}/tables': ['frequency', 'cooccurrence', 'case-by-code'].flatMap((k) => [`?kind=${k}`, `?kind=${k}&count=segments&coder=${s.users.coder.id}`]),
      '/api/studies/{studyId}/export': ['csv', 'codebook-md', 'codebook-csv', 'memos-md', 'qdc', 'qdpx'].map((f) => `?format=${f}`),
      '/api/studies/{studyId}/audit': ['?limit=500'],
    };
    // Open streams (read elsewhere) and routes that need a link's secret are not called.
    const elsewhere = ['/api/studies/{studyId}/comments/events', '/api/studies/{studyId}/events', '/api/invitations/{token}', '/api/password-resets/{token}'];
    let calls = 0;
    const seen = new Set<string>();
    for await (const { path, url, status, parts } of sweepGetRoutes(server.url, trainee.cookie, { spec, values, queries, skip: elsewhere })) {
      calls++;
      if (url.includes(s.hiddenTextId)) expect(status, `GET ${url}`).toBeGreaterThanOrEqual(400);
      for (const part of parts) {
        expect(markersIn(part, hidden), `GET ${url} (${status})`).toEqual([]);
        for (const m of markersIn(part, Object.values(SEEN))) seen.add(`${path}:${m}`);
      }
    }
    // The opening of the assigned text carries the memos the trainee may read: the scan sees memos there.
    expect(seen).toContain(`/api/texts/{textId}/opening:${SEEN.assigned}`);
    const list = await trainee.call<Array<{ id: string }>>('GET', `/api/studies/${s.studyId}/texts`);
    expect(list.body.map((t) => t.id)).not.toContain(s.hiddenTextId);
    console.log(`API answers scanned for the trainee: ${calls}`);
  }, 240_000);

  it('assigning the text closes the trainee’s memos socket with 4409; a fresh copy receives its entries; a stale view is refused at connect', async () => {
    const before = (await trainee.call<{ memosView: string }>('GET', `/api/studies/${s.studyId}`)).body.memosView;
    expect(before).toMatch(/^[0-9a-f]{16}$/);
    const memos = connect(trainee.cookie, s.memosRoom, false, { memosView: before });
    await synced(memos);
    const assigned = await lead.call('POST', `/api/studies/${s.studyId}/assignments`, { textId: s.hiddenTextId, userId: s.users.trainee.id });
    expect(assigned.status).toBe(201);
    await waitFor(() => memos.closes.includes(VIEW_CHANGED), 'the trainee’s memos socket closes with 4409');
    const after = (await trainee.call<{ memosView: string }>('GET', `/api/studies/${s.studyId}`)).body.memosView;
    expect(after).not.toBe(before);
    // A client still holding the copy made for the old view is closed at once, before any sync message.
    const stale = connect(trainee.cookie, s.memosRoom, false, { memosView: before });
    await waitFor(() => stale.closes.includes(VIEW_CHANGED), 'a stale copy is closed with 4409');
    expect(stale.doc.store.clients.size).toBe(0);
    const fresh = connect(trainee.cookie, s.memosRoom, false, { memosView: after });
    await synced(fresh);
    expect(bodies(fresh.doc)).toEqual(expect.arrayContaining([HIDDEN.jottingWords, HIDDEN.live, SEEN.assigned]));
    // the coder's jotting on their own segment stays withheld: a trainee reads no one else's layer
    expect(bodies(fresh.doc)).not.toContain(HIDDEN.jottingSegment);
    expect(bodies(fresh.doc)).not.toContain(HIDDEN.reply);
  }, 120_000);
});
