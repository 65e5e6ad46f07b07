/**
 * Independent coding at the wire (issue 8, "Tests: wire level"): real server processes, stock
 * y-websocket 3.1 clients. While a round is independent, every frame a participant receives (sync and
 * awareness, decoded with y-protocols' message layout and Yjs' decodeUpdate) and every answer of every
 * GET route in the OpenAPI description they call carry none of the unique markers planted in other
 * people's segments (notes, segment ids), their comments on them, their jottings on them (memos room),
 * or their pointing presence (caret, hover). Another person's layer room is refused at the upgrade, whatever the id's casing. After the
 * reveal the same client receives them (so the scan can see a marker when there is one). An open
 * socket loses a room when a round starts or a membership is removed, also on the other node (two
 * processes on PostgreSQL and Redis when DATABASE_URL and REDIS_URL are set), pushed by the change with
 * the periodic re-check switched off; the delay is printed, not asserted (a timed assertion fails on a
 * loaded machine; issue 8's "within a second" is a figure for the closing note).
 * Expected behaviour: the project's own rules (issue 8 items 2, 3, 6; DESIGN §2, §6). Statuses: RFC 9110
 * (403) and RFC 6455 (101 handshake accepted; 1008 policy violation, §7.4.1).
 */
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import type { Db } from '@gloss/db';
import { addMemo, addSegment, listMemos, listSegments } from '@gloss/model';
import { apiClient, upgradeStatus, webSocketWithHeaders } from '../support/http.js';
import type { Person } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { sweepGetRoutes } from '../support/route-sweep.js';
import { waitFor } from '../support/wait.js';
import { decodeFrame, markersIn, recordingWebSocket, type Frame } from './frames.js';
import { clientsFor, seedRoundsWithCoder2Base, startRoundOfThree, type Client, type Coder2Seed, type RoundOut } from './support.js';

const POLICY_VIOLATION = 1008; // RFC 6455 §7.4.1
const twoNodes = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);
const kind = process.env.DATABASE_URL ? 'postgres' : 'pglite';
const tag = randomBytes(4).toString('hex');
/** Unique words planted in what others write or point at; none may reach a participant before the reveal. */
const M = {
  baseCoder2: `mk-base-coder2-${tag}`,
  roundCoder2: `mk-round-coder2-${tag}`,
  roundLead: `mk-round-lead-${tag}`,
  roundCoder: `mk-round-coder-${tag}`,
  caretCoder2: `mk-caret-coder2-${tag}`,
  hoverCoder2: `mk-hover-coder2-${tag}`,
  caretLead: `mk-caret-lead-${tag}`,
  commentCoder2: `mk-comment-coder2-${tag}`,
  jottingCoder2: `mk-jotting-coder2-${tag}`,
  studyMemo: `mk-study-memo-${tag}`,
  afterCaret: `mk-caret-after-${tag}`,
};

type WireSeed = Coder2Seed;
const seed = (db: Db) => seedRoundsWithCoder2Base(db, M.baseCoder2);

interface Conn {
  doc: Y.Doc;
  provider: WebsocketProvider;
  closes: Array<{ code: number; reason: string; at: number }>;
}

describe(`independent coding at the wire (${twoNodes ? 'two nodes, PostgreSQL and Redis' : `one node, ${kind}`})`, () => {
  let a: SpawnedServer<WireSeed>;
  let b: SpawnedServer<undefined> | null = null;
  let s: WireSeed;
  let as: Record<Person, Client>;
  let roundId = '';
  const rooms: Partial<Record<'coder' | 'coder2' | 'lead', string>> = {};
  const segIds: Record<string, string> = {};
  const all: WebsocketProvider[] = [];
  /** Every frame the coder's sockets received (on both nodes). */
  const coderFrames: Frame[] = [];
  /** Every frame the lead's sockets received. */
  const leadFrames: Frame[] = [];
  const nodeB = () => b ?? a;
  /** The coder's live comment events (an open HTTP stream until aborted). */
  const events = new AbortController();

  beforeAll(async () => {
    // No periodic re-check of open sockets (it runs every 60 s by default): every close seen here is
    // pushed by the change itself, on every node, which is what makes "within a second" hold by design.
    const env: Record<string, string> = { ACCESS_RECHECK_SECONDS: '0', ...(twoNodes ? { REDIS_URL: process.env.REDIS_URL! } : {}) };
    a = await spawnServer({ db: kind, seed, env, startTimeoutMs: 240_000 });
    if (twoNodes) b = await spawnServer({ db: 'postgres', sameDatabaseAs: a, env, startTimeoutMs: 240_000 });
    s = a.seeded;
    as = await clientsFor(a.url);
  }, 500_000);
  afterAll(async () => {
    events.abort();
    for (const p of all.splice(0)) p.destroy();
    await b?.stop();
    await a?.stop();
  }, 120_000);

  function connect(server: SpawnedServer<unknown>, who: Person, room: string, frames?: Frame[]): Conn {
    const headers = { cookie: as[who].cookie, origin: server.url };
    const Poly = frames ? recordingWebSocket(headers, frames) : webSocketWithHeaders(WebSocket, headers);
    const doc = new Y.Doc({ gc: false });
    const provider = new WebsocketProvider(server.url.replace(/^http/, 'ws') + '/sync', room, doc, {
      WebSocketPolyfill: Poly as never,
      disableBc: true,
      // A room closed for lost access would be refused at the upgrade: do not retry it.
      shouldReconnect: (event: CloseEvent) => event.code !== POLICY_VIOLATION,
    } as ConstructorParameters<typeof WebsocketProvider>[3]);
    all.push(provider);
    const closes: Conn['closes'] = [];
    provider.on('connection-close', (event) => {
      if (event) closes.push({ code: event.code, reason: event.reason, at: Date.now() });
    });
    return { doc, provider, closes };
  }
  const synced = (...cs: Conn[]) => waitFor(() => cs.every((c) => c.provider.synced), 'clients synced', 60_000);
  const api = (server: SpawnedServer<unknown>, who: Person) => apiClient(server.url, as[who].cookie);
  const open = (server: SpawnedServer<unknown>, who: Person, room: string) => upgradeStatus(server.url, room, { origin: server.url, cookie: as[who].cookie });
  const ownRoundLayer = async (who: 'coder' | 'coder2' | 'lead') =>
    (await as[who].call<RoundOut>('GET', `/api/rounds/${roundId}`)).body.texts[0]!.layers.find((l) => l.mine)!.room;

  it('starting a round closes a participant’s open socket on another person’s layer, pushed by the change, on both nodes', async () => {
    const onA = connect(a, 'coder', s.coder2BaseLayer);
    const onB = connect(nodeB(), 'coder', s.coder2BaseLayer);
    await synced(onA, onB);
    // Before the round the coder reads coder2's layer (the marker is there to be found).
    for (const c of [onA, onB]) expect(listSegments(c.doc).map((x) => x.note)).toContain(M.baseCoder2);

    const started = Date.now();
    const res = await startRoundOfThree(s, as.lead, 'Wire round');
    expect(res.status).toBe(201);
    roundId = res.body.id;
    await waitFor(() => onA.closes.length > 0 && onB.closes.length > 0, 'both sockets close', 20_000);
    // The round starts when it is stored: its createdAt (the database's clock, on this same machine).
    const storedAt = Date.parse((res.body as unknown as { createdAt: string }).createdAt);
    for (const c of [onA, onB]) {
      expect(c.closes[0]!.code).toBe(POLICY_VIOLATION);
    }
    console.log(`round start -> close: node A ${onA.closes[0]!.at - storedAt} ms, node B ${onB.closes[0]!.at - storedAt} ms after it was stored (${onA.closes[0]!.at - started} ms after the request)`);
  }, 60_000);

  it('another person’s layer room is refused at the upgrade, lower or UPPER case, on both nodes; one’s own opens', async () => {
    for (const who of ['coder', 'coder2', 'lead'] as const) rooms[who] = await ownRoundLayer(who);
    const others = [rooms.coder2!, rooms.lead!, s.coder2BaseLayer];
    for (const server of [a, nodeB()]) {
      for (const room of others) {
        expect(await open(server, 'coder', room), room).toBe(403);
        expect(await open(server, 'coder', room.toUpperCase()), room.toUpperCase()).toBe(403);
      }
      expect(await open(server, 'coder', rooms.coder!)).toBe(101);
      expect(await open(server, 'coder', rooms.coder!.toUpperCase())).toBe(101);
      // The lead takes part: their lead role opens nobody else's layer of the round's text either.
      expect(await open(server, 'lead', rooms.coder!)).toBe(403);
      expect(await open(server, 'lead', s.coderBaseLayer.toUpperCase())).toBe(403);
    }
  }, 60_000);

  /** The markers a person must not receive during the independent phase, and their own (which they must). */
  const othersOf = (who: 'coder' | 'lead') => {
    const segs = who === 'coder' ? [M.roundCoder2, M.roundLead, M.baseCoder2] : [M.roundCoder2, M.roundCoder, M.baseCoder2];
    const ids = who === 'coder' ? ['coder2', 'lead', 'base2'] : ['coder2', 'coder', 'base2'];
    const pointing = who === 'coder' ? [M.caretCoder2, M.hoverCoder2, M.caretLead] : [M.caretCoder2, M.hoverCoder2];
    return [...segs, ...ids.map((k) => segIds[k]!), ...pointing, M.commentCoder2, M.jottingCoder2];
  };

  it('independent phase: no frame and no API answer carries others’ segments, comments or pointing', async () => {
    const ph = (who: Person) => ({ id: s.users[who].id, name: who });
    // The coder: text room on both nodes, codebook, memos and their own round layer, every frame recorded.
    const coderText = connect(a, 'coder', s.codingTextRoom, coderFrames);
    const coderTextB = connect(nodeB(), 'coder', s.codingTextRoom, coderFrames);
    const coderCb = connect(nodeB(), 'coder', s.codebookRoom, coderFrames);
    const coderMemos = connect(a, 'coder', s.memosRoom, coderFrames);
    const coderLayer = connect(a, 'coder', rooms.coder!, coderFrames);
    const leadText = connect(nodeB(), 'lead', s.codingTextRoom, leadFrames);
    const leadLayer = connect(nodeB(), 'lead', rooms.lead!, leadFrames);
    const c2Text = connect(a, 'coder2', s.codingTextRoom);
    const c2Layer = connect(a, 'coder2', rooms.coder2!);
    await synced(coderText, coderTextB, coderCb, coderMemos, coderLayer, leadText, leadLayer, c2Text, c2Layer);

    // The coder's comment events, from before anyone comments.
    let sse = '';
    const stream = await fetch(`${a.url}/api/studies/${s.studyId}/comments/events`, { headers: { cookie: as.coder.cookie, origin: a.url }, signal: events.signal });
    expect(stream.status).toBe(200);
    void (async () => {
      const decoder = new TextDecoder();
      try {
        for await (const chunk of stream.body as unknown as AsyncIterable<Uint8Array>) sse += decoder.decode(chunk, { stream: true });
      } catch {
        // aborted at the end of the test
      }
    })();
    await waitFor(() => sse.includes('event: ready'), 'comment events ready');

    // Everyone codes in their own round layer; coder2 also comments on their segment.
    const words = (doc: Y.Doc, w: string) => doc.getText('text').toString().indexOf(w);
    const code = (layer: Conn, text: Conn, w: string, codeId: string, note: string) =>
      addSegment(layer.doc, text.doc, { codeId, start: words(text.doc, w), end: words(text.doc, w) + w.length, note });
    segIds.coder2 = code(c2Layer, c2Text, 'lent me a spade', s.codes.access, M.roundCoder2);
    segIds.lead = code(leadLayer, leadText, 'a plot for the summer', s.codes.place, M.roundLead);
    segIds.coder = code(coderLayer, coderText, 'lent me a spade', s.codes.tools, M.roundCoder);
    segIds.base2 = s.base2SegId;
    // Pointing: the text's caret and a hovered segment (field names as the web app uses and any other).
    c2Text.provider.awareness.setLocalState({ user: { ...ph('coder2'), n: 'S1' }, where: { textId: s.codingTextId }, caret: { a: M.caretCoder2, h: M.caretCoder2 }, hover: M.hoverCoder2 });
    leadText.provider.awareness.setLocalState({ user: { ...ph('lead'), n: 'S1' }, where: { textId: s.codingTextId }, caret: { a: M.caretLead, h: M.caretLead } });
    coderText.provider.awareness.setLocalState({ user: { ...ph('coder'), n: 'S1' }, where: { textId: s.codingTextId }, caret: { a: 'mine', h: 'mine' } });

    // Wait until each writer's server-side state holds what they wrote (store and projection).
    const servedTo = async (who: Person, id: string) => (await api(a, who).call<Array<{ id: string }>>('GET', `/api/texts/${s.codingTextId}/segments`)).body.some((x) => x.id === id);
    const retrievedBy = async (who: Person, id: string) => (await api(a, who).call<{ items: Array<{ id: string }> }>('GET', `/api/studies/${s.studyId}/retrieval?limit=500`)).body.items.some((r) => r.id === id);
    await waitFor(async () => (await servedTo('coder2', segIds.coder2!)) && (await servedTo('lead', segIds.lead!)) && (await servedTo('coder', segIds.coder!)), 'each round segment stored', 30_000);
    await waitFor(async () => (await retrievedBy('coder2', segIds.coder2!)) && (await retrievedBy('lead', segIds.lead!)) && (await retrievedBy('coder', segIds.coder!)), 'each round segment projected', 30_000);
    const comment = await api(a, 'coder2').call<{ comment: { id: string } }>('POST', `/api/texts/${s.codingTextId}/comments`, { layer: rooms.coder2, segmentId: segIds.coder2, body: M.commentCoder2 });
    expect(comment.status).toBe(201);
    // Events reach a listener in order: once the coder's own later comment arrives, coder2's would have.
    const own = await api(a, 'coder').call<{ comment: { id: string } }>('POST', `/api/texts/${s.codingTextId}/comments`, { layer: rooms.coder, segmentId: segIds.coder, body: 'my own note' });
    expect(own.status).toBe(201);
    await waitFor(() => sse.includes(own.body.comment.id), 'the coder’s own comment event');
    // coder2 jots on their round segment, then writes a study memo: the coder's memos receive the second
    // (the room relays in order), never the first (memo-view.ts: others' segment jottings, independent phase).
    const c2Memos = connect(a, 'coder2', s.memosRoom);
    await synced(c2Memos);
    addMemo(c2Memos.doc, { author: s.users.coder2.id, kind: 'jotting', body: M.jottingCoder2, attachedTo: { kind: 'segment', textId: s.codingTextId, segmentId: segIds.coder2! } });
    addMemo(c2Memos.doc, { author: s.users.coder2.id, body: M.studyMemo, attachedTo: { kind: 'study' } });
    await waitFor(() => listMemos(coderMemos.doc).some((m) => m.body === M.studyMemo), 'coder2’s study memo reaches the coder');
    expect(listMemos(coderMemos.doc).map((m) => m.body)).not.toContain(M.jottingCoder2);
    expect(sse).not.toContain(comment.body.comment.id);
    events.abort();
    // Presence: the others' states have reached the coder on both nodes (names stay).
    const seen = (c: Conn, who: Person) => [...c.provider.awareness.getStates().values()].some((st) => (st.user as { id?: string; n?: string } | undefined)?.id === s.users[who].id && (st.user as { n?: string }).n === 'S1');
    await waitFor(() => [coderText, coderTextB].every((c) => seen(c, 'coder2') && seen(c, 'lead')) && seen(leadText, 'coder2') && seen(leadText, 'coder'), 'everyone’s presence reached the coder and the lead');

    // Every frame, decoded: nothing of the others; in the text room others' states keep only who and where.
    for (const [who, frames] of [['coder', coderFrames], ['lead', leadFrames]] as const) {
      const markers = othersOf(who);
      const kinds = new Set<string>();
      for (const f of frames) {
        const d = decodeFrame(f.bytes);
        kinds.add(d.kind);
        expect(markersIn(d.text, markers), `${who}: decoded ${d.kind} frame in ${f.room}`).toEqual([]);
        expect(markersIn(f.bytes, markers), `${who}: raw ${d.kind} frame in ${f.room}`).toEqual([]);
        if (d.kind === 'awareness' && f.room === s.codingTextRoom) {
          for (const st of d.states!) {
            const mine = (st.state?.user as { id?: string } | undefined)?.id === s.users[who].id;
            if (st.state && !mine) expect(Object.keys(st.state).filter((k) => k !== 'user' && k !== 'where'), `${who}: a colleague's presence`).toEqual([]);
          }
        }
      }
      expect([...kinds]).toEqual(expect.arrayContaining(['sync-step1', 'sync-step2', 'awareness']));
      console.log(`${who}: ${frames.length} frames decoded (${[...kinds].join(', ')})`);
    }
    // Every GET route of the OpenAPI description, for the coder and the lead (both take part).
    const checked = await scanApi('coder');
    await scanApi('lead');
    console.log(`API answers scanned for the coder: ${checked}`);
  }, 240_000);

  /**
   * Calls every GET route of the OpenAPI description with every id it may take (all texts, all known
   * rooms, the round, several query variants that name others) and scans each answer (ZIP entries
   * unpacked) for others' markers. Own markers must show up in the segments answer (the scan can see).
   */
  async function scanApi(who: 'coder' | 'lead'): Promise<number> {
    const client = api(a, who);
    const spec = (await client.call<{ paths: Record<string, { get?: unknown }> }>('GET', '/api/openapi.json')).body;
    const allRooms = [s.codingTextRoom, s.textRoom, s.codebookRoom, s.memosRoom, s.coderBaseLayer, s.coder2BaseLayer, rooms.coder!, rooms.coder2!, rooms.lead!];
    const layerRooms = [rooms.coder!, rooms.coder2!, rooms.lead!, s.coderBaseLayer, s.coder2BaseLayer];
    const versionIds: string[] = [];
    for (const room of allRooms) {
      const v = await client.call<Array<{ id: string }>>('GET', `/api/documents/${room}/versions`);
      if (v.status === 200) versionIds.push(...v.body.map((x) => x.id));
    }
    const people = [s.users.coder.id, s.users.coder2.id, s.users.lead.id].join(',');
    const values: Record<string, string[]> = {
      studyId: [s.studyId],
      textId: [s.codingTextId, s.textId],
      roundId: [roundId],
      room: allRooms,
      versionId: versionIds.length ? versionIds : ['00000000-0000-4000-8000-000000000000'],
    };
    const queries: Record<string, string[]> = {
      '/api/studies/{studyId}/agreement': ['', `?coders=${people}`, `?texts=${s.codingTextId}&coders=${people}&unit=sentence&bootstrap=20`],
      '/api/texts/{textId}/comparison': layerRooms.flatMap((l) => layerRooms.filter((r) => r !== l).map((r) => `?layer=${l}&reference=${r}`)),
      '/api/studies/{studyId}/retrieval': ['?limit=500', `?limit=500&coder=${people}`, '?limit=500&round=1', `?limit=500&code=${s.codes.place}`],
      '/api/studies/{studyId}/tables': ['frequency', 'cooccurrence', 'case-by-code'].flatMap((k) => [`?kind=${k}`, `?kind=${k}&count=segments&coder=${people}`]),
      '/api/studies/{studyId}/export': ['csv', 'codebook-md', 'codebook-csv', 'memos-md', 'qdc', 'qdpx'].map((f) => `?format=${f}`),
      '/api/rounds/{roundId}/report': ['', '?format=md', '?format=csv'],
      '/api/studies/{studyId}/audit': ['?limit=500'],
    };
    // Not called here: the live comment events are read above; the study's live events are an open
    // stream that names texts added and nothing of anyone's coding; a token route needs a link's secret.
    const elsewhere = ['/api/studies/{studyId}/comments/events', '/api/studies/{studyId}/events', '/api/invitations/{token}', '/api/password-resets/{token}'];
    const markers = othersOf(who);
    const own = segIds[who]!;
    let calls = 0;
    let sawOwn = false;
    for await (const { path, url, status, parts } of sweepGetRoutes(a.url, as[who].cookie, { spec, values, queries, skip: elsewhere })) {
      calls++;
      for (const part of parts) {
        expect(markersIn(part, markers), `${who}: GET ${url} (${status})`).toEqual([]);
        if (path === '/api/texts/{textId}/segments' && markersIn(part, [own]).length) sawOwn = true;
      }
    }
    expect(sawOwn, `${who}'s own round segment is served to them`).toBe(true);
    return calls;
  }

  it('after the reveal the same client receives the others’ segments and pointing', async () => {
    const revealed = await as.lead.call('POST', `/api/rounds/${roundId}/reveal`);
    expect(revealed.status).toBe(200);
    expect(await open(a, 'coder', rooms.coder2!.toUpperCase())).toBe(101);
    const c2Layer = connect(nodeB(), 'coder', rooms.coder2!, coderFrames);
    await synced(c2Layer);
    expect(listSegments(c2Layer.doc).map((x) => x.note)).toContain(M.roundCoder2);
    const coderText = connect(a, 'coder', s.codingTextRoom, coderFrames);
    const c2Text = connect(nodeB(), 'coder2', s.codingTextRoom);
    await synced(coderText, c2Text);
    c2Text.provider.awareness.setLocalState({ user: { id: s.users.coder2.id, name: 'coder2' }, where: { textId: s.codingTextId }, caret: { a: M.afterCaret, h: M.afterCaret } });
    await waitFor(() => [...coderText.provider.awareness.getStates().values()].some((st) => (st.caret as { a?: string } | undefined)?.a === M.afterCaret), 'coder2’s caret reaches the coder');
    // The same scan now finds them in the frames and in the answers.
    const found = new Set(coderFrames.flatMap((f) => markersIn(decodeFrame(f.bytes).text, [M.roundCoder2, M.afterCaret])));
    expect([...found].sort()).toEqual([M.afterCaret, M.roundCoder2].sort());
    const segs = await as.coder.call<Array<{ id: string }>>('GET', `/api/texts/${s.codingTextId}/segments`);
    expect(segs.body.map((x) => x.id)).toEqual(expect.arrayContaining([segIds.coder2, segIds.lead, segIds.coder]));
    const threads = await as.coder.call<string>('GET', `/api/texts/${s.codingTextId}/comments`);
    expect(JSON.stringify(threads.body)).toContain(M.commentCoder2);
    // coder2's jotting is readable now: a fresh memos copy carries it (the one filtered before was closed with 4409)
    const memos = connect(a, 'coder', s.memosRoom, coderFrames);
    await synced(memos);
    expect(listMemos(memos.doc).map((m) => m.body)).toContain(M.jottingCoder2);
  }, 60_000);

  it('removing a member closes their open sockets, pushed by the change, on both nodes', async () => {
    const onA = connect(a, 'coder2', rooms.coder2!);
    const onB = connect(nodeB(), 'coder2', s.codingTextRoom);
    await synced(onA, onB);
    const started = Date.now();
    const removed = await as.owner.call('DELETE', `/api/studies/${s.studyId}/members/${s.users.coder2.id}`);
    expect(removed.status).toBe(204);
    await waitFor(() => onA.closes.length > 0 && onB.closes.length > 0, 'both sockets close', 20_000);
    for (const c of [onA, onB]) {
      expect(c.closes[0]!.code).toBe(POLICY_VIOLATION);
    }
    console.log(`member removed -> close: node A ${onA.closes[0]!.at - started} ms, node B ${onB.closes[0]!.at - started} ms`);
  }, 60_000);
}, 600_000);
