/**
 * De-identification that removes (issue 12 item 6, DESIGN §8), against a real server on PGlite and,
 * when DATABASE_URL is set, PostgreSQL. Hand-built texts carry identifiers placed on purpose; the
 * expected quotes are worked by hand. After the purge no table holds the original bytes — checked
 * by this test's own scan of every table of the schema (test/support/schema-scan.ts), in text, jsonb
 * and bytea columns — and a stock y-websocket client that held the old copy is closed with 4410
 * every time it tries, so it cannot send the old history back. (Close codes 4000–4999 are left to
 * applications by RFC 6455 §7.4.2.) The identifiers are also planted outside the transcripts — a code's
 * definition and example, a memo and its reply, a segment note, a comment on a segment — and must be
 * found there, replaced there and purged from there; an old copy of the memos document that connects to
 * the rebuilt memos room is closed with 4410 before anything of it is stored.
 */
import * as Y from 'yjs';
import WebSocket from 'ws';
import { WebsocketProvider } from 'y-websocket';
import { and, asc, auditLog, documents, eq, rounds, studies, updates, pseudonyms, segmentComments, versions, type Db } from '@gloss/db';
import { addCode, addExample, addMemo, addReply, addSegment, exampleFromSegment, getCode, getMemo, listMemos, listReplies, listSegments, newLayerDoc, readText, resolveExample, setSegmentNote } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, startServer, type RunningServer } from '../../apps/server/src/index.js';
import { addTextFromTranscript, ensureLayer, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { freshPgliteDir, freshPostgresDatabase } from '../support/database.js';
import { apiClient, signIn, webSocketWithHeaders, type ApiClient } from '../support/http.js';
import { scanForOriginals } from '../support/original-scan.js';
import { allTables } from '../support/schema-scan.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { dbKinds } from '../support/server.js';
import { waitFor } from '../support/wait.js';

const TEXT_1 = 'I: Who helped you at first?\nP3: Dana Whitcombe did. Dana drove me to Lowmere every week; you can ring her on 07700 900123.';
const TEXT_2 = 'I: And later?\nP7: Later Dana Whitcombe moved to Lowmere for good.';
const ORIGINALS = ['Dana Whitcombe', 'Dana', 'Lowmere', '07700 900123'];

async function startFresh(kind: 'pglite' | 'postgres') {
  if (kind === 'pglite') {
    const folder = await freshPgliteDir();
    const server = await startServer(loadConfig({ PORT: '0', DATA_DIR: folder.dir, LOG_LEVEL: 'silent' }));
    return { server, drop: async () => folder.remove() };
  }
  const fresh = await freshPostgresDatabase();
  const server = await startServer(loadConfig({ PORT: '0', DATABASE_URL: fresh.url, LOG_LEVEL: 'silent' }));
  return { server, drop: () => fresh.drop() };
}

/** A document as stored (its log). */
async function stored(db: Db, room: string): Promise<Y.Doc> {
  const rows = await db.select().from(updates).where(eq(updates.docId, room)).orderBy(asc(updates.seq));
  const doc = new Y.Doc({ gc: false });
  for (const r of rows) Y.applyUpdate(doc, r.data);
  return doc;
}

/** Appends what `change` does to a stored document as one log row (before any room opens). */
async function changeStored(db: Db, room: string, change: (doc: Y.Doc) => void): Promise<void> {
  const doc = await stored(db, room);
  const before = Y.encodeStateVector(doc);
  change(doc);
  const u = Y.encodeStateAsUpdate(doc, before);
  await db.insert(updates).values({ docId: room, data: u, bytes: u.byteLength });
}

/** A coder's layer with segments written straight into the log before any room opens; the first segment gets `note`. */
async function codeText(db: Db, seed: BasicSeed, textId: string, room: string, spans: Array<[string, string]>, note?: string): Promise<{ layerId: string; textDoc: Y.Doc; layer: Y.Doc; first: string }> {
  const textDoc = await stored(db, room);
  const t = readText(textDoc);
  const layer = newLayerDoc();
  const ids = spans.map(([from, to]) => addSegment(layer, textDoc, { codeId: 'help', start: t.indexOf(from), end: t.indexOf(to) + to.length }));
  if (note) setSegmentNote(layer, ids[0]!, note);
  const layerId = await ensureLayer(db, seed.studyId, textId, seed.users.coder.id);
  const u = Y.encodeStateAsUpdate(layer);
  await db.insert(updates).values({ docId: layerId, data: u, bytes: u.byteLength });
  return { layerId, textDoc, layer, first: ids[0]! };
}

/** Rows, per table, of every table of the schema (but the key) whose text, jsonb or bytea holds any original. */
const ownScan = (db: Db) => scanForOriginals(db, ORIGINALS);

interface Segment { coderId: string; quote: string; start: number; end: number }

describe.each(dbKinds())('de-identification on %s', (kind) => {
  let server: RunningServer;
  let drop: () => Promise<void>;
  let seed: BasicSeed;
  let lead: ApiClient;
  let owner: ApiClient;
  let coderCookie: string;
  const texts: Array<{ id: string; room: string }> = [];
  let codeId = '';
  let person = '';
  let memoId = '';
  const quotes = async (textId: string) => ((await lead.call<Segment[]>('GET', `/api/texts/${textId}/segments`)).body).map((s) => s.quote).sort();

  beforeAll(async () => {
    ({ server, drop } = await startFresh(kind));
    seed = await seedBasic(server.db);
    for (const [title, body] of [['Helpers 1', TEXT_1], ['Helpers 2', TEXT_2]] as const) {
      const t = await addTextFromTranscript(server.db, seed.studyId, { title, transcript: transcriptFromPlainText(body), sourceFormat: 'txt', createdBy: seed.users.owner.id });
      texts.push({ id: t.id, room: t.room });
    }
    const coded = await codeText(server.db, seed, texts[0]!.id, texts[0]!.room, [['Dana Whitcombe', 'Dana Whitcombe'], ['Dana drove', 'Lowmere'], ['every', 'week'], ['Who', 'first?']], 'Dana again');
    await codeText(server.db, seed, texts[1]!.id, texts[1]!.room, [['Later', 'Whitcombe'], ['moved', 'good.']]);
    // outside the transcripts: a code's definition and an example (quote "Dana Whitcombe", also in the change log), a memo and a reply, a comment
    await changeStored(server.db, seed.codebookRoom, (cb) => {
      codeId = addCode(cb, { label: 'Neighbour help', briefDefinition: 'Help from Dana Whitcombe or anyone in Lowmere' }, { by: seed.users.lead.id });
      addExample(cb, codeId, exampleFromSegment(coded.textDoc, coded.layer, texts[0]!.id, coded.first), 'example', { by: seed.users.lead.id });
    });
    await changeStored(server.db, seed.memosRoom, (m) => {
      memoId = addMemo(m, { author: seed.users.lead.id, title: 'Helpers', body: 'Lowmere came up twice.', attachedTo: { kind: 'study' } });
      addReply(m, memoId, { author: seed.users.coder.id, body: 'Dana drove.' });
    });
    await server.db.insert(segmentComments).values({ studyId: seed.studyId, textId: texts[0]!.id, layerDocId: coded.layerId, segmentId: coded.first, authorId: seed.users.lead.id, body: 'Is Dana the same person?' });
    // the study's own words and a past round's (closed, so it restricts no one), and the audit entry that kept the round's name
    await server.db.update(studies).set({ description: 'Who helps whom around Lowmere.' }).where(eq(studies.id, seed.studyId));
    // the round kept the codebook in force when it started as a named version (as rounds/records.ts does)
    const [kept] = await server.db.insert(versions).values({ docId: seed.codebookRoom, name: 'At the start of round 1', snapshot: Y.encodeSnapshot(Y.snapshot(await stored(server.db, seed.codebookRoom))) }).returning();
    const [round] = await server.db.insert(rounds).values({ studyId: seed.studyId, number: 1, name: 'Lowmere pilot', purpose: 'Calibrate on the Lowmere interviews', unit: 'turn', statistic: 'cohen', phase: 'closed', codebookVersionId: kept!.id }).returning();
    await server.db.insert(auditLog).values({ userId: seed.users.lead.id, studyId: seed.studyId, action: 'round.close', target: round!.id, detail: { name: 'Lowmere pilot', number: 1 } });
    lead = apiClient(server.url, await signIn(server.url, PEOPLE.lead.email, PASSWORD));
    owner = apiClient(server.url, await signIn(server.url, PEOPLE.owner.email, PASSWORD));
    coderCookie = await signIn(server.url, PEOPLE.coder.email, PASSWORD);
  }, 240_000);
  afterAll(async () => {
    await server?.close();
    await drop?.();
  });

  it('a coder may not find, apply or purge; only the owner reads the key', async () => {
    const coder = apiClient(server.url, coderCookie);
    expect((await coder.call('POST', `/api/studies/${seed.studyId}/deid/candidates`, {})).status).toBe(403);
    expect((await coder.call('POST', `/api/studies/${seed.studyId}/deid/purge`, {})).status).toBe(403);
    expect((await lead.call('GET', `/api/studies/${seed.studyId}/pseudonyms`)).status).toBe(403);
  }, 180_000); // generous: at load 18 on two cores one step took over 30 s

  it('finds the identifiers across both texts; the same person gets the same pseudonym; replacement keeps every quote outside the replaced words', async () => {
    const found = await lead.call<{ candidates: Array<{ original: string; kind: string; occurrences: number; textIds: string[]; where: string[]; suggestion: string }> }>(
      'POST', `/api/studies/${seed.studyId}/deid/candidates`, { list: ['Lowmere'] },
    );
    expect(found.status).toBe(200);
    const by = new Map(found.body.candidates.map((c) => [c.original, c]));
    // two in the texts, three in the codebook (definition, example quote, the change log's note of the example)
    expect(by.get('Dana Whitcombe')).toMatchObject({ kind: 'person', occurrences: 5 });
    expect(by.get('Dana Whitcombe')!.where.sort()).toEqual(['codebook', 'texts']);
    expect(by.get('Dana')!.where.sort()).toEqual(['comments', 'memos', 'segment notes', 'texts']);
    expect(by.get('Dana Whitcombe')!.textIds.sort()).toEqual(texts.map((t) => t.id).sort());
    expect(by.get('Dana')!.suggestion).toBe(by.get('Dana Whitcombe')!.suggestion);
    // two in the texts, the definition, the memo, the study's description, the round's name and purpose
    expect(by.get('Lowmere')).toMatchObject({ kind: 'listed', occurrences: 7 });
    expect(by.get('Lowmere')!.where.sort()).toEqual(['codebook', 'memos', 'round names', 'study details', 'texts']);
    expect(by.get('07700 900123')?.kind).toBe('phone');

    const before = await Promise.all(texts.map((t) => quotes(t.id)));
    person = by.get('Dana Whitcombe')!.suggestion;
    // accepted as suggested, one edited by the reviewer (Lowmere → [Town A]), the rest rejected (not sent)
    const accepted = [
      { original: 'Dana Whitcombe', pseudonym: person, kind: 'person' },
      { original: 'Dana', pseudonym: person, kind: 'person' },
      { original: 'Lowmere', pseudonym: '[Town A]', kind: 'place' },
      { original: '07700 900123', pseudonym: '[phone]', kind: 'phone' },
    ];
    const applied = await lead.call<{ occurrences: number; texts: number }>('POST', `/api/studies/${seed.studyId}/deid/apply`, { replacements: accepted });
    expect(applied.body).toMatchObject({ occurrences: 6, texts: 2 }); // text 1: four, text 2: two
    // codebook: definition 2, example quote 1, change log 1; memos: memo 1, reply 1; the note; the comment
    // the study's description, the round's name and purpose, the audit entry's copy of the name
    expect(applied.body).toMatchObject({ elsewhere: { codebook: 4, memos: 2, notes: 1, comments: 1, titles: 0, study: 1, rounds: 2, audit: 1 } });
    const [details] = await server.db.select().from(studies).where(eq(studies.id, seed.studyId));
    expect(details!.description).toBe('Who helps whom around [Town A].');
    expect((await server.db.select().from(rounds).where(eq(rounds.studyId, seed.studyId))).map((r) => [r.name, r.purpose])).toEqual([['[Town A] pilot', 'Calibrate on the [Town A] interviews']]);
    const replace = (q: string) => q.replace(/Dana Whitcombe/g, person).replace(/\bDana\b/g, person).replace(/Lowmere/g, '[Town A]');
    await waitFor(async () => JSON.stringify(await quotes(texts[0]!.id)) === JSON.stringify(before[0]!.map(replace).sort()), 'quotes of text 1 follow the replacement', 90_000);
    expect(await quotes(texts[0]!.id)).toEqual([person, `${person} drove me to [Town A]`, 'Who helped you at first?', 'every week'].sort());
    expect(await quotes(texts[1]!.id)).toEqual(before[1]!.map(replace).sort());
    // the audit log has each replacement, without the original words
    const entries = await server.db.select().from(auditLog).where(eq(auditLog.action, 'deid.replace'));
    expect(entries).toHaveLength(4);
    expect(JSON.stringify(entries)).not.toMatch(/Dana|Lowmere|07700/);
  }, 180_000);

  it('before the purge the originals are still in the database (update log), and the scan says so', async () => {
    const scan = await lead.call<{ scan: { occurrences: number; byTable: Record<string, number> } }>('GET', `/api/studies/${seed.studyId}/deid/scan`);
    expect(scan.body.scan.occurrences).toBeGreaterThan(0);
    expect(scan.body.scan.byTable.updates).toBeGreaterThan(0);
    expect(Object.keys(await ownScan(server.db))).toContain('updates.data');
  }, 180_000);

  it('the purge leaves no original in any table, keeps every quote, and an old client is told 4410 and cannot bring the history back', async () => {
    // an old client: a stock y-websocket client holding the text with its deleted names
    const doc = new Y.Doc({ gc: false }); // as the web app opens text documents
    const closes: number[] = [];
    const provider = new WebsocketProvider(server.url.replace(/^http/, 'ws') + '/sync', texts[0]!.room, doc, {
      WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie: coderCookie, origin: server.url }) as never,
      disableBc: true,
    } as ConstructorParameters<typeof WebsocketProvider>[3]);
    provider.on('connection-close', (e: CloseEvent | null) => void (e && closes.push(e.code)));
    await waitFor(() => provider.synced, 'old client synced', 60_000);
    expect(Buffer.from(Y.encodeStateAsUpdate(doc)).includes(Buffer.from('Whitcombe'))).toBe(true);

    const before = await Promise.all(texts.map((t) => quotes(t.id)));
    // an old copy of the memos document, as a client that held it before the purge would
    const oldMemosCopy = await stored(server.db, seed.memosRoom);
    const [layerRow] = await server.db.select({ id: documents.id }).from(documents).where(and(eq(documents.textId, texts[0]!.id), eq(documents.kind, 'layer')));
    const layerOf0 = layerRow!.id;
    const purge = await lead.call<{
      texts: Array<{ textId: string; oldRoom: string; newRoom: string }>;
      documents: Array<{ kind: string; oldRoom: string; newRoom: string }>;
      scan: { occurrences: number; tablesScanned: number };
    }>(
      'POST', `/api/studies/${seed.studyId}/deid/purge`, {},
    );
    expect(purge.status).toBe(200);
    expect(purge.body.scan.occurrences).toBe(0);
    // the server's scan visits every table of the schema that can hold words (but accounts and the key)
    const wordy = allTables().filter((t) => !['users', 'sessions', 'pseudonyms'].includes(t.name) && t.columns.some((c) => ['text', 'jsonb', 'bytea'].includes(c.type)));
    expect(purge.body.scan.tablesScanned).toBe(wordy.length);
    // named versions went with the old documents: the round no longer points at one that is gone
    expect((await server.db.select().from(rounds).where(eq(rounds.studyId, seed.studyId))).map((r) => r.codebookVersionId)).toEqual([null]);
    await waitFor(() => closes.includes(4410), 'old client closed with 4410', 60_000);
    // y-websocket 3 treats 4400–4499 as permanent and stops; a client that tries again anyway (raw
    // socket, the old room) completes the upgrade only to be closed with 4410 before any sync message.
    const again = await new Promise<string>((resolve) => {
      const ws = new WebSocket(`${server.url.replace(/^http/, 'ws')}/sync/${texts[0]!.room}`, { headers: { cookie: coderCookie, origin: server.url } });
      let messages = 0;
      ws.on('message', () => messages++);
      ws.on('close', (code) => resolve(`close ${code} after ${messages} messages`));
      ws.on('unexpected-response', (_req, res) => resolve(`http ${res.statusCode}`));
    });
    expect(again).toBe('close 4410 after 0 messages');
    provider.destroy();

    expect(await ownScan(server.db)).toEqual({});
    // every document of the study was rebuilt under a new room; what pointed at the old ones follows
    const rebuilt = new Map(purge.body.documents.map((d) => [d.oldRoom, d.newRoom]));
    expect(purge.body.documents.map((d) => d.kind).sort()).toEqual(['codebook', 'layer', 'layer', 'memos', 'text', 'text', 'text']);
    const [comment] = await server.db.select().from(segmentComments).where(eq(segmentComments.studyId, seed.studyId));
    expect(comment).toMatchObject({ body: `Is ${person} the same person?`, layerDocId: rebuilt.get(layerOf0) });
    const newText = await stored(server.db, rebuilt.get(texts[0]!.room)!);
    const cb = await stored(server.db, rebuilt.get(seed.codebookRoom)!);
    expect(getCode(cb, codeId).briefDefinition).toBe(`Help from ${person} or anyone in [Town A]`);
    expect(resolveExample(newText, getCode(cb, codeId).examples[0]!)).toMatchObject({ current: person, changed: false });
    const memos = await stored(server.db, rebuilt.get(seed.memosRoom)!);
    expect(getMemo(memos, memoId).body).toBe('[Town A] came up twice.');
    expect(listReplies(memos, memoId).map((r) => r.body)).toEqual([`${person} drove.`]);
    expect(listSegments(await stored(server.db, rebuilt.get(layerOf0)!)).map((x) => x.note).filter(Boolean)).toEqual([`${person} again`]);

    // an old copy of the memos document (it still holds "Dana" in its history) that finds the rebuilt
    // room is closed with 4410 at its first sync answer, and nothing of it is stored
    const oldMemos = new Y.Doc({ gc: false });
    Y.applyUpdate(oldMemos, Y.encodeStateAsUpdate(oldMemosCopy));
    expect(listMemos(oldMemos).length).toBeGreaterThan(0);
    const oldCloses: number[] = [];
    const sneaky = new WebsocketProvider(server.url.replace(/^http/, 'ws') + '/sync', rebuilt.get(seed.memosRoom)!, oldMemos, {
      WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie: coderCookie, origin: server.url }) as never,
      disableBc: true,
    } as ConstructorParameters<typeof WebsocketProvider>[3]);
    sneaky.on('connection-close', (e: CloseEvent | null) => void (e && oldCloses.push(e.code)));
    await waitFor(() => oldCloses.includes(4410), 'old memos copy closed with 4410 in the rebuilt room', 60_000);
    sneaky.destroy();
    expect(await ownScan(server.db)).toEqual({});
    const rooms = await server.db.select({ id: documents.id }).from(documents).where(eq(documents.kind, 'text'));
    for (const t of purge.body.texts) {
      expect(rooms.map((r) => r.id)).toContain(t.newRoom);
      expect(rooms.map((r) => r.id)).not.toContain(t.oldRoom);
    }
    const detail = await lead.call<{ room: string }>('GET', `/api/texts/${texts[0]!.id}`);
    expect(detail.body.room).toBe(purge.body.texts.find((t) => t.textId === texts[0]!.id)!.newRoom);
    expect(await Promise.all(texts.map((t) => quotes(t.id)))).toEqual(before);

    // the key holds the originals apart from the texts; the owner exports it once, then deletes it
    const key = await owner.call<{ entries: Array<{ original: string; pseudonym: string }> }>('GET', `/api/studies/${seed.studyId}/pseudonyms`);
    expect(key.body.entries.map((e) => e.original).sort()).toEqual([...ORIGINALS].sort());
    const csv = await owner.call<string>('POST', `/api/studies/${seed.studyId}/pseudonyms/export`, {});
    expect(csv.status).toBe(200);
    expect(String(csv.body)).toContain('Dana Whitcombe');
    expect((await owner.call('POST', `/api/studies/${seed.studyId}/pseudonyms/export`, {})).status).toBe(409);
    expect((await owner.call('DELETE', `/api/studies/${seed.studyId}/pseudonyms`)).status).toBe(204);
    expect(await server.db.select().from(pseudonyms)).toEqual([]);
    const actions = (await server.db.select({ action: auditLog.action }).from(auditLog)).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(['deid.purge', 'deid.key.export', 'deid.key.delete']));
  }, 180_000);
});
