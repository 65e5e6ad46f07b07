/**
 * Deleting a study or a text (issue 12 item 7, DESIGN §8): after DELETE no row of it is left in any
 * table — checked table by table from the drizzle schema (test/support/schema-scan.ts visits every
 * exported table, so a table added later is checked too) — apart from one audit entry that holds ids
 * and counts only; open sockets of deleted documents close with 4404. Status codes per RFC 9110
 * (204 No Content, 403, 404). Runs on PGlite and, when DATABASE_URL is set, PostgreSQL.
 */
import {
  auditLog, documents, eq, projectedAttributes, projectedCaseTexts, projectedCaseValues, projectedCases,
  projectedCodes, projectedMemos, projectedSegments, projectionState, pseudonymKeyExports, pseudonyms, retiredDocuments, roundDone, roundParticipants,
  roundReading, roundTexts, rounds, segmentComments, snapshots, supervisionSettings, textAssignments, textReferences, updates, versions, type Db,
} from '@gloss/db';
import WebSocket from 'ws';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, startServer, type RunningServer } from '../../apps/server/src/index.js';
import { addTextFromTranscript, createInvitation, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { freshPgliteDir, freshPostgresDatabase } from '../support/database.js';
import { apiClient, signIn } from '../support/http.js';
import { allTables, rowsMentioning } from '../support/schema-scan.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { dbKinds } from '../support/server.js';

/** Tables that hold accounts, not study data: a study's deletion leaves them alone. */
const NOT_STUDY_DATA = new Set(['users', 'sessions']);

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

/** One row in every table a study can have rows in (beyond what seedBasic made). Returns the ids that name the study's rows. */
async function fillEveryTable(db: Db, seed: BasicSeed): Promise<string[]> {
  const { studyId, textId, textRoom, users } = seed;
  const [layer] = await db.insert(documents).values({ kind: 'layer', studyId, textId, coderId: users.coder.id }).returning({ id: documents.id });
  const [round] = await db.insert(rounds).values({ studyId, number: 1, name: 'First round', unit: 'turn', statistic: 'cohen' }).returning({ id: rounds.id });
  await db.insert(roundTexts).values({ roundId: round!.id, textId });
  await db.insert(roundParticipants).values({ roundId: round!.id, userId: users.coder.id });
  await db.insert(roundDone).values({ roundId: round!.id, textId, userId: users.coder.id });
  await db.insert(roundReading).values({ roundId: round!.id, textId, userId: users.coder.id, wordsRead: 12 });
  await db.insert(textAssignments).values({ studyId, textId, userId: users.coder.id, assignedBy: users.lead.id });
  await db.insert(textReferences).values({ textId, layerDocId: layer!.id, chosenBy: users.lead.id });
  await db.insert(supervisionSettings).values({ studyId });
  await db.insert(updates).values({ docId: layer!.id, data: new Uint8Array([0, 0]), bytes: 2 });
  await db.insert(snapshots).values({ docId: textRoom, seq: 0, data: new Uint8Array([0, 0]), bytes: 2 });
  await db.insert(versions).values({ docId: textRoom, name: 'as imported', snapshot: new Uint8Array([0, 0]) });
  const now = new Date();
  await db.insert(projectedSegments).values({ layerDocId: layer!.id, id: 's1', studyId, textId, coderId: users.coder.id, codeId: 'c1', start: 0, end: 5, quote: 'words', orphaned: false, createdAt: now });
  await db.insert(projectionState).values({ docId: layer!.id, seq: 0, textSeq: 0 }).onConflictDoNothing();
  await db.insert(projectedCodes).values({ studyId, id: 'c1', label: 'Borrowing', status: 'active', type: 'data-driven', briefDefinition: '', fullDefinition: '', inclusion: '', exclusion: '', colour: '#000000', inVivo: false, createdAt: now });
  await db.insert(projectedMemos).values({ studyId, id: 'm1', author: users.coder.id, kind: 'memo', attachedKind: 'study', title: 'First thoughts', body: 'words', createdAt: now, updatedAt: now });
  await db.insert(projectedCases).values({ studyId, id: 'p01', name: 'P01', kind: 'participant' });
  await db.insert(projectedAttributes).values({ studyId, id: 'a1', name: 'site', type: 'text' });
  await db.insert(projectedCaseValues).values({ studyId, caseId: 'p01', attributeId: 'a1', value: 'north' });
  await db.insert(projectedCaseTexts).values({ studyId, caseId: 'p01', textId });
  await db.insert(segmentComments).values({ studyId, textId, layerDocId: layer!.id, segmentId: 's1', authorId: users.lead.id, body: 'Why this code?' });
  await createInvitation(db, { studyId, email: 'new.person@example.test', role: 'coder', createdBy: users.owner.id });
  await db.insert(pseudonyms).values({ studyId, kind: 'person', original: 'Dana Whitcombe', pseudonym: '[Person 1]' });
  await db.insert(pseudonymKeyExports).values({ studyId });
  await db.insert(retiredDocuments).values({ id: '00000000-0000-4000-8000-000000000001', studyId, textId, replacedBy: textRoom });
  return [studyId, textId, textRoom, layer!.id, round!.id, seed.codebookRoom, seed.memosRoom, '00000000-0000-4000-8000-000000000001'];
}

/** Waits for the close frame of a sync socket opened on `room` and returns its code and reason. */
function openRoom(url: string, room: string, cookie: string): Promise<{ closed: Promise<{ code: number; reason: string }> }> {
  return new Promise((resolve, reject) => {
    const ws = new WebSocket(`${url.replace('http', 'ws')}/sync/${room}`, { headers: { cookie, origin: url } });
    const closed = new Promise<{ code: number; reason: string }>((done) => ws.on('close', (code, reason) => done({ code, reason: reason.toString() })));
    ws.once('open', () => resolve({ closed }));
    ws.once('error', reject);
  });
}

describe.each(dbKinds())('deleting a study and a text on %s', (kind) => {
  let server: RunningServer;
  let drop: () => Promise<void>;
  let seed: BasicSeed;
  let ids: string[];
  const client = async (person: keyof typeof PEOPLE) => {
    const cookie = await signIn(server.url, PEOPLE[person].email, PASSWORD);
    return { cookie, api: apiClient(server.url, cookie) };
  };

  beforeAll(async () => {
    ({ server, drop } = await startFresh(kind));
    seed = await seedBasic(server.db);
    ids = await fillEveryTable(server.db, seed);
  }, 240_000);
  afterAll(async () => {
    await server?.close();
    await drop?.();
  });

  it('the seeded study has rows in every table of the schema but accounts', async () => {
    const before = await rowsMentioning(server.db, ids);
    const tables = allTables().map((t) => t.name).filter((n) => !NOT_STUDY_DATA.has(n));
    // A table nobody seeds here would make the deletion check below prove nothing for it.
    for (const name of tables) expect(before[name] ?? 0, `no row of the study in ${name}: seed one in fillEveryTable`).toBeGreaterThan(0);
  });

  it('only an owner or a lead may delete a text; a coder is refused with 403 and nothing goes', async () => {
    const { api } = await client('coder');
    const res = await api.call('DELETE', `/api/texts/${seed.textId}`);
    expect(res.status).toBe(403);
    expect((await rowsMentioning(server.db, [seed.textId])).texts).toBe(1);
  });

  it('DELETE /api/texts/:id answers 204, closes its open sockets with 4404 and leaves no row of the text', async () => {
    const other = await addTextFromTranscript(server.db, seed.studyId, {
      title: 'Second interview', transcript: transcriptFromPlainText('P02: We shared the shed keys.'), sourceFormat: 'txt', createdBy: seed.users.owner.id,
    });
    const { api } = await client('lead');
    const coder = await client('coder');
    const socket = await openRoom(server.url, other.room, coder.cookie);
    const res = await api.call('DELETE', `/api/texts/${other.id}`);
    expect(res.status).toBe(204);
    const closed = await socket.closed;
    expect(closed.code).toBe(4404);
    expect(closed.reason).toContain('deleted');
    const left = await rowsMentioning(server.db, [other.id, other.room]);
    // Only the study's audit log names it (by id): its import, without the title now, and its deletion.
    expect(Object.entries(left).filter(([, n]) => n > 0)).toEqual([['audit_log', 2]]);
    const entries = await server.db.select().from(auditLog).where(eq(auditLog.target, other.id));
    expect(entries.map((e) => [e.action, e.detail])).toEqual([['text.import', null], ['text.delete', { documents: 1 }]]);
    expect(entries[1]!.userId).toBe(seed.users.lead.id);
    expect((await api.call('GET', `/api/texts/${other.id}`)).status).toBe(404);
  });

  it('a lead may not delete the study; the owner gets 204 and no row of the study is left in any table', async () => {
    const lead = await client('lead');
    expect((await lead.api.call('DELETE', `/api/studies/${seed.studyId}`)).status).toBe(403);
    const owner = await client('owner');
    const socket = await openRoom(server.url, seed.codebookRoom, lead.cookie);
    const res = await owner.api.call('DELETE', `/api/studies/${seed.studyId}`);
    expect(res.status).toBe(204);
    expect((await socket.closed).code).toBe(4404);
    const left = await rowsMentioning(server.db, ids);
    expect(Object.entries(left).filter(([, n]) => n > 0)).toEqual([['audit_log', 1]]);
    const entries = await server.db.select().from(auditLog).where(eq(auditLog.studyId, seed.studyId));
    expect(entries.map((e) => e.action)).toEqual(['study.delete']);
    expect(entries[0]!.detail).toEqual({ texts: 1, documents: 4 });
    expect((await owner.api.call('GET', `/api/studies/${seed.studyId}`)).status).toBe(404);
    // Accounts stay: people may belong to other studies.
    expect((await owner.api.call('GET', '/api/me')).status).toBe(200);
  });

  it('describes both deletions in the OpenAPI document', async () => {
    const doc = (await apiClient(server.url).call<{ paths: Record<string, Record<string, { responses: Record<string, unknown> }>> }>('GET', '/api/openapi.json')).body;
    expect(Object.keys(doc.paths['/api/studies/{studyId}']!.delete!.responses)).toContain('204');
    expect(Object.keys(doc.paths['/api/texts/{textId}']!.delete!.responses)).toContain('204');
  });
});
