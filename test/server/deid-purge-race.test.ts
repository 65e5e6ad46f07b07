/**
 * An append in flight when the purge runs cannot land in the retired document afterwards (issue 12
 * item 6, DESIGN §8), on PostgreSQL, with the order forced by real locks rather than by timing:
 *
 * 1. Another node's append of an update carrying the original name is executed and held uncommitted
 *    (store/insert-batch.ts, the statement the store runs: it takes FOR KEY SHARE on its document's
 *    row). The purge, started then, must wait for it — it is seen blocked on a lock in
 *    pg_stat_activity — and once the append commits, the purge deletes that row with its document.
 * 2. After the purge, another node's append to the retired room is refused, alone (document-gone).
 *
 * Each time, this test's own scan of every table finds the original nowhere. Row locks and the
 * cascade of a foreign key as PostgreSQL documents them (ch. 13.3 "Explicit Locking", row-level lock
 * modes: FOR UPDATE of a delete conflicts with FOR KEY SHARE). Runs when DATABASE_URL is set.
 */
import * as Y from 'yjs';
import { openDatabase, rowsOf, sql, type Database } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, startServer, type RunningServer } from '../../apps/server/src/index.js';
import { addTextFromTranscript, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { insertBatch } from '../../apps/server/src/store/insert-batch.js';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import { freshPostgresDatabase } from '../support/database.js';
import { apiClient, signIn, type ApiClient } from '../support/http.js';
import { scanForOriginals } from '../support/original-scan.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { waitFor } from '../support/wait.js';
import { loadStoredDoc } from '../coding/support.js';

const ORIGINALS = ['Dana Whitcombe', 'Dana'];

/** An update to the stored text that writes the name and takes it out again: its bytes hold the name, the text never does. */
async function updateCarryingName(db: Database['db'], room: string): Promise<Uint8Array> {
  const doc = await loadStoredDoc(db, room);
  const before = Y.encodeStateVector(doc);
  const text = doc.getText('text');
  doc.transact(() => {
    text.insert(text.length, ' Dana');
    text.delete(text.length - 5, 5);
  });
  const update = Y.encodeStateAsUpdate(doc, before);
  doc.destroy();
  expect(Buffer.from(update).includes(Buffer.from('Dana'))).toBe(true);
  return update;
}

describe.runIf(Boolean(process.env.DATABASE_URL))('an append in flight during the purge (PostgreSQL)', () => {
  let server: RunningServer;
  let drop: () => Promise<void>;
  let other: Database;
  let seed: BasicSeed;
  let lead: ApiClient;
  let room = '';
  let textId = '';

  beforeAll(async () => {
    const fresh = await freshPostgresDatabase();
    drop = fresh.drop;
    server = await startServer(loadConfig({ PORT: '0', DATABASE_URL: fresh.url, LOG_LEVEL: 'silent' }));
    other = await openDatabase({ databaseUrl: fresh.url, maxConnections: 2 }); // "another node"
    seed = await seedBasic(server.db);
    const t = await addTextFromTranscript(server.db, seed.studyId, { title: 'Helpers', transcript: transcriptFromPlainText('P3: Dana Whitcombe drove me every week.'), sourceFormat: 'txt', createdBy: seed.users.owner.id });
    room = t.room;
    textId = t.id;
    lead = apiClient(server.url, await signIn(server.url, PEOPLE.lead.email, PASSWORD));
    const replacements = [
      { original: 'Dana Whitcombe', pseudonym: '[Person 1]', kind: 'person' },
      { original: 'Dana', pseudonym: '[Person 1]', kind: 'person' },
    ];
    expect((await lead.call('POST', `/api/studies/${seed.studyId}/deid/apply`, { replacements })).status).toBe(200);
  }, 240_000);
  afterAll(async () => {
    await other?.close();
    await server?.close();
    await drop?.();
  });

  it('the purge waits for an append holding its document, then deletes the appended row with it', async () => {
    const update = await updateCarryingName(server.db, room);
    let release!: () => void;
    const released = new Promise<void>((resolve) => (release = resolve));
    let appended: Array<number | null> = [];
    let executed = false;
    const append = other.db.transaction(async (tx) => {
      appended = await insertBatch(tx as never, [{ docId: room, data: update, userId: null }]);
      executed = true;
      await released; // the append is in flight: executed, not committed
    });
    await waitFor(() => executed, 'the other node executed its append');
    expect(appended).toHaveLength(1);
    expect(appended[0]).toBeTypeOf('number');

    const purge = lead.call<{ scan: { occurrences: number }; texts: Array<{ textId: string; oldRoom: string; newRoom: string }> }>('POST', `/api/studies/${seed.studyId}/deid/purge`, {});
    // the purge reaches its delete and waits on the append's row lock (seen, not assumed)
    await waitFor(async () => {
      const [row] = rowsOf<{ n: string | number }>(
        await other.db.execute(sql`select count(*) as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock' and query ilike 'delete from "documents"%'`),
      );
      return Number(row?.n ?? 0) > 0;
    }, 'the purge waiting for the in-flight append', 120_000);
    release();
    await append;
    const done = await purge;
    expect(done.status).toBe(200);
    expect(done.body.scan.occurrences).toBe(0);
    expect(done.body.texts.find((t) => t.textId === textId)?.oldRoom).toBe(room);
    expect(await scanForOriginals(server.db, ORIGINALS)).toEqual({});
    const [left] = rowsOf<{ n: string | number }>(await server.db.execute(sql`select count(*) as n from updates where seq = ${appended[0]!}`));
    expect(Number(left!.n)).toBe(0);
  }, 240_000);

  it('after the purge, an append to the retired room is refused alone and stores nothing', async () => {
    const update = await updateCarryingName(server.db, room);
    expect(await insertBatch(other.db, [{ docId: room, data: update, userId: null }])).toEqual([null]);
    const store = createPgUpdateStore(other, { compactMinBytes: 0 });
    await expect(store.append(room, update, null)).rejects.toMatchObject({ code: 'document-gone' });
    await store.close();
    expect(await scanForOriginals(server.db, ORIGINALS)).toEqual({});
  }, 120_000);
});
