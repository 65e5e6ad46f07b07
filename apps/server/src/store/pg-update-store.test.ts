/**
 * The durable update log on PGlite (and PostgreSQL when DATABASE_URL is set): group commit, order,
 * catch-up reads, and compaction that folds the log into a snapshot without losing anything.
 * Expected document contents come from Yjs itself (applying the same updates to a fresh Y.Doc).
 */
import { rowsOf, snapshots, sql, type Database } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { dbKinds, openTestDatabase } from '../../../../test/support/database.js';
import { seedDocuments } from '../../../../test/sync/support/fixtures.js';
import { compactDocument } from './compaction.js';
import { createPgUpdateStore } from './pg-update-store.js';

/** n single-character inserts by one client, as separate updates. */
function typedUpdates(n: number, text = 'interview'): { updates: Uint8Array[]; expected: string } {
  const doc = new Y.Doc({ gc: false });
  const updates: Uint8Array[] = [];
  doc.on('update', (u: Uint8Array) => updates.push(u));
  for (let i = 0; i < n; i++) doc.getText('text').insert(i, text[i % text.length]!);
  return { updates, expected: doc.getText('text').toString() };
}

const textOf = (updates: Uint8Array[]) => {
  const doc = new Y.Doc({ gc: false });
  for (const u of updates) Y.applyUpdate(doc, u);
  return doc.getText('text').toString();
};

describe.each(dbKinds())('PgUpdateStore on %s', (kind) => {
  let database: Database;
  let docIds: string[];
  let userId: string;

  beforeAll(async () => {
    database = await openTestDatabase(kind);
    ({ docIds, userId } = await seedDocuments(database, 5));
  });
  afterAll(async () => database?.close());

  it('stores every byte value exactly, with and without an author, in small and large batches', async () => {
    // Small batches go as literals on PGlite (insert-batch.ts): each byte 0-255 must come back as it went in.
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const every = Uint8Array.from({ length: 256 }, (_, i) => i);
    const sizes = [1, 3, 300]; // one row, a small batch, a batch past the literal limit (unnest)
    const sent: Uint8Array[] = [];
    for (const n of sizes) {
      const batch = Array.from({ length: n }, (_, i) => every.subarray(i % 256, 256 - (i % 7)));
      sent.push(...batch);
      await Promise.all(batch.map((data, i) => store.append(docIds[4]!, data, i % 2 === 0 ? userId : null)));
    }
    const { updates } = await store.since(docIds[4]!, 0);
    expect(updates.map((u) => Buffer.from(u).toString('hex'))).toEqual(sent.map((u) => Buffer.from(u).toString('hex')));
    if (kind === 'pglite') {
      // Batches of up to 16 rows went through statements prepared once per size (pglite-prepared.ts), the same session's.
      const prepared = rowsOf<{ name: string }>(await database.db.execute(sql`select name from pg_prepared_statements where name like 'gloss_append_%'`));
      expect(prepared.map((r) => r.name).sort()).toEqual(['gloss_append_1', 'gloss_append_3']);
    }
    await store.close();
  });

  it('refuses an append to a document that is gone, alone: the rest of its batch is stored (small, literal and unnest batches)', async () => {
    // A purge deletes the retired document's row; an append arriving later must not fail everyone's batch (insert-batch.ts).
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const { docIds: [gone, live] } = await seedDocuments(database, 2); // its own: the bytes below are not Yjs updates
    await database.db.execute(sql`delete from documents where id = ${gone!}::uuid`);
    for (const n of [2, 40, 300]) {
      const results = await Promise.allSettled(Array.from({ length: n }, (_, i) => store.append(i % 2 === 0 ? gone! : live!, Uint8Array.of(n, i % 256), null)));
      expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(Math.floor(n / 2));
      for (const r of results.filter((x) => x.status === 'rejected')) expect((r as PromiseRejectedResult).reason).toMatchObject({ code: 'document-gone' });
    }
    expect((await store.since(gone!, 0)).updates).toEqual([]);
    await store.close();
  });

  it('commits a burst in few statements, seqs rising in submission order across documents', async () => {
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const { updates, expected } = typedUpdates(300);
    const seqs = await Promise.all(updates.map((u, i) => store.append(docIds[i % 2]!, u, i % 3 === 0 ? userId : null)));
    for (let i = 1; i < seqs.length; i++) expect(seqs[i]!).toBeGreaterThan(seqs[i - 1]!);
    const { batches, rows } = store.stats();
    expect(rows).toBe(300);
    expect(batches).toBeLessThan(10);
    // Interleaved across two documents: each holds its half; together they rebuild the text.
    const a = await store.load(docIds[0]!);
    const b = await store.load(docIds[1]!);
    expect(a.updates.length + b.updates.length).toBe(300);
    expect(textOf([...a.updates, ...b.updates])).toBe(expected);
    expect(Math.max(a.seq, b.seq)).toBe(seqs.at(-1));
    await store.close();
  });

  it('refuses a malformed document id alone, without failing the batch it would have joined', async () => {
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const [good] = typedUpdates(1).updates;
    const results = await Promise.allSettled([store.append('x},{y', good!, null), store.append(docIds[2]!, good!, null)]);
    expect(results[0]).toMatchObject({ status: 'rejected', reason: { code: 'append-failed' } });
    expect(results[1]!.status).toBe('fulfilled');
    await store.close();
  });

  it('loads a snapshot written with seq 0 (an importer that wrote no log rows)', async () => {
    const [extra] = await seedDocuments(database, 1).then((f) => f.docIds);
    const { updates, expected } = typedUpdates(5);
    const data = Y.mergeUpdates(updates);
    await database.db.insert(snapshots).values({ docId: extra!, seq: 0, data, bytes: data.length });
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const loaded = await store.load(extra!);
    expect(textOf(loaded.updates)).toBe(expected);
    expect(loaded.seq).toBe(0);
    await store.close();
  });

  it('since() returns only what came after a seq', async () => {
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const { updates } = typedUpdates(10);
    const seqs: number[] = [];
    for (const u of updates) seqs.push(await store.append(docIds[2]!, u, null));
    const later = await store.since(docIds[2]!, seqs[6]!);
    expect(later.updates).toEqual(updates.slice(7));
    expect(later.seq).toBe(seqs[9]);
    expect(later.seqs).toEqual(seqs.slice(7));
    // After a fold the snapshot comes first, marked 0: it is never mistaken for one row already seen.
    await store.compact(docIds[2]!);
    expect((await store.since(docIds[2]!, seqs[6]!)).seqs).toEqual([0]);
    const none = await store.since(docIds[2]!, seqs[9]!);
    expect(none).toEqual({ updates: [], seq: seqs[9], seqs: [] });
    await store.close();
  });

  it('folds the log into a snapshot once the log outgrows it, keeping the document whole', async () => {
    const docId = docIds[3]!;
    const store = createPgUpdateStore(database, { compactMinBytes: 1_000 });
    await store.load(docId); // starts tracking sizes for this document
    const { updates, expected } = typedUpdates(400);
    const seqs = await Promise.all(updates.map((u) => store.append(docId, u, null)));
    await store.compactionsIdle();
    expect(store.stats().compactions).toBeGreaterThan(0);
    const loaded = await store.load(docId);
    expect(loaded.updates.length).toBeLessThan(updates.length);
    expect(textOf(loaded.updates)).toBe(expected);
    expect(loaded.seq).toBe(seqs.at(-1));
    // Compacting twice at once: the advisory lock lets one fold; nothing is lost either way.
    await store.append(docId, typedUpdates(1, 'z').updates[0]!, null);
    const both = await Promise.all([store.compact(docId), store.compact(docId)]);
    expect(both.filter((r) => r.compacted)).toHaveLength(1);
    const after = await store.since(docId, 0);
    expect(after.updates).toHaveLength(1); // only the snapshot is left
    await store.close();
  });
  it('a fold merges off the event loop and keeps a row committed while it merged', async () => {
    const [docId] = (await seedDocuments(database, 1)).docIds;
    const store = createPgUpdateStore(database, { compactMinBytes: 0 });
    const doc = new Y.Doc({ gc: false });
    const all: Uint8Array[] = [];
    doc.on('update', (u: Uint8Array) => all.push(u));
    for (let i = 0; i < 50; i++) doc.getText('text').insert(i, 'a');
    for (const u of all) await store.append(docId!, u, null);
    const late = () => {
      doc.getText('text').insert(0, 'L');
      return store.append(docId!, all.at(-1)!, null);
    };
    // the store's own fold (merge on the thread), with an append landing between its read and its write
    const result = await compactDocument(database, docId!, { merge: (parts) => Promise.resolve(Y.mergeUpdates(parts)), beforeWrite: async () => void (await late()) });
    expect(result).toMatchObject({ compacted: true, foldedRows: 50 });
    const loaded = await store.load(docId!);
    expect(loaded.updates).toHaveLength(2); // the snapshot and the late row, which was not read, so not deleted
    expect(textOf(loaded.updates)).toBe(doc.getText('text').toString());
    // the store's fold through its merge thread
    for (let i = 0; i < 5; i++) doc.getText('text').insert(0, 'b');
    for (const u of all.slice(-5)) await store.append(docId!, u, null);
    expect(await store.compact(docId!)).toMatchObject({ compacted: true, foldedRows: 6 });
    expect(textOf((await store.load(docId!)).updates)).toBe(doc.getText('text').toString());
    await store.close();
  });

  it('a fold that finds the snapshot rewritten since its read gives up and loses nothing', async () => {
    const [docId] = (await seedDocuments(database, 1)).docIds;
    const store = createPgUpdateStore(database, { compactMinBytes: 0, mergeOffThread: false });
    const { updates, expected } = typedUpdates(30);
    for (const u of updates.slice(0, 20)) await store.append(docId!, u, null);
    await store.compact(docId!);
    for (const u of updates.slice(20)) await store.append(docId!, u, null);
    // another node folds between this fold's read and its write: the rows this fold read are gone
    const raced = await compactDocument(database, docId!, { beforeWrite: async () => void expect(await compactDocument(database, docId!)).toMatchObject({ compacted: true }) });
    expect(raced).toEqual({ compacted: false, reason: 'raced' });
    const loaded = await store.load(docId!);
    expect(loaded.updates).toHaveLength(1);
    expect(textOf(loaded.updates)).toBe(expected);
    await store.close();
  });
});
