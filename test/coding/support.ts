/**
 * Shared pieces of the coding-model integration tests: an invented study with a three-turn text and a
 * small codebook, and stock y-websocket clients on Y.Doc({gc:false}) as the web app uses.
 * Names, places and words are made up.
 */
import { addTextFromTranscript, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { assignText } from '../../apps/server/src/supervision/records.js';
import { type Db, asc, eq, snapshots, updates } from '@gloss/db';
import { addCode, createCodebookDoc } from '@gloss/model';
import * as Y from 'yjs';
import { apiClient, type ApiClient } from '../support/http.js';
import { seedBasic, type BasicSeed, type Person } from '../support/seed.js';
import { cookieFor, remoteClient } from '../sync/support/remote.js';

export const CODING_TEXT = [
  'Interviewer: How did you start with the allotment?',
  'P01: My neighbour lent me a spade and a plot for the summer.',
  'P01: Then the committee gave us keys to the shed.',
].join('\n');

export interface CodingSeed extends BasicSeed {
  codingTextId: string;
  codingTextRoom: string;
  codes: { tools: string; access: string; time: string; place: string };
}

/** Writes a document's state as a log update (the server reads snapshot + log). */
export async function appendUpdate(db: Db, docId: string, doc: Y.Doc): Promise<void> {
  const data = Y.encodeStateAsUpdate(doc);
  await db.insert(updates).values({ docId, data, bytes: data.byteLength });
}

export async function seedCoding(db: Db): Promise<CodingSeed> {
  const base = await seedBasic(db);
  const text = await addTextFromTranscript(db, base.studyId, {
    title: 'Allotment interview 2',
    transcript: transcriptFromPlainText(CODING_TEXT),
    sourceFormat: 'txt',
    createdBy: base.users.owner.id,
  });
  const cb = createCodebookDoc();
  const by = { by: base.users.lead.id };
  const codes = {
    tools: addCode(cb, { label: 'Borrowed tools', briefDefinition: 'Tools lent between plot holders.' }, by),
    access: addCode(cb, { label: 'Access to shared things', briefDefinition: 'Keys, sheds, water.' }, by),
    time: addCode(cb, { label: 'Seasons', briefDefinition: 'Talk of the growing year.' }, by),
    place: addCode(cb, { label: 'The site', briefDefinition: 'The allotment as a place.' }, by),
  };
  await appendUpdate(db, base.codebookRoom, cb);
  // A trainee reads only texts assigned to them (issue 9): the lead assigns them this one.
  await assignText(db, { studyId: base.studyId, textId: text.id, userId: base.users.trainee.id, assignedBy: base.users.lead.id });
  return { ...base, codingTextId: text.id, codingTextRoom: text.room, codes };
}

export async function clientFor(url: string, person: Person): Promise<ApiClient & { cookie: string }> {
  const cookie = await cookieFor(url, person);
  return { ...apiClient(url, cookie), cookie };
}

export function gcOffClient(url: string, cookie: string, room: string) {
  return remoteClient(url, cookie, room, new Y.Doc({ gc: false }));
}

export { waitFor as until } from '../support/wait.js';

/** A stored document (snapshot, then log) read straight from the tables, for seeding before a start. */
export async function loadStoredDoc(db: Db, docId: string): Promise<Y.Doc> {
  const doc = new Y.Doc({ gc: false });
  const [snap] = await db.select().from(snapshots).where(eq(snapshots.docId, docId));
  if (snap) Y.applyUpdate(doc, snap.data);
  const rows = await db.select().from(updates).where(eq(updates.docId, docId)).orderBy(asc(updates.seq));
  for (const r of rows) if (!snap || r.seq > snap.seq) Y.applyUpdate(doc, r.data);
  return doc;
}
