/**
 * Folds a document's log into its snapshot, in two steps so that neither the database connection nor
 * the event loop is held while the updates are merged (PGlite has one connection: appends of every
 * document waited behind a fold, issue 11):
 * 1. read the snapshot and log rows (one statement, no lock), merge them (`merge`, on a thread of its own
 *    in the server);
 * 2. one transaction under an advisory lock per document (two nodes never fold one document at once):
 *    if the snapshot is still byte for byte the one read, write the merged one and delete exactly the
 *    rows read. A row committed meanwhile (a higher seq, or a lower one from a slower transaction) stays
 *    in the log; if another fold wrote the snapshot meanwhile, this fold gives up (`raced`) and the
 *    rows it read stay where they are.
 */
import { documents, snapshots, toUint8Array, updates, type Database } from '@gloss/db';
import { and, eq, inArray } from 'drizzle-orm';
import * as Y from 'yjs';
import { FULL_READ, readLog } from './log-rows.js';

export type CompactionResult =
  | { compacted: true; foldedRows: number; snapshotBytes: number; seq: number }
  | { compacted: false; reason: 'locked' | 'nothing-to-fold' | 'raced' };

export interface CompactionOptions {
  /** Merges the snapshot and rows; default `Y.mergeUpdates` in this thread. */
  merge?: (parts: Uint8Array[]) => Promise<Uint8Array> | Uint8Array;
  /** Runs between the read-and-merge and the write (tests use it to put a fold in between). */
  beforeWrite?: () => Promise<void>;
}

const DELETE_CHUNK = 5_000;

const sameBytes = (a: Uint8Array | null, b: Uint8Array | null) =>
  a === null || b === null ? a === b : a.byteLength === b.byteLength && Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

export async function compactDocument(database: Database, docId: string, options: CompactionOptions = {}): Promise<CompactionResult> {
  const read = await readLog(database.db, docId, FULL_READ);
  if (read.log.length === 0) return { compacted: false, reason: 'nothing-to-fold' };
  const parts = read.snapshot === null ? [] : [read.snapshot.data];
  let seq = read.snapshot?.seq ?? 0;
  for (const row of read.log) {
    parts.push(row.data);
    seq = Math.max(seq, row.seq);
  }
  const data = await (options.merge ?? Y.mergeUpdates)(parts);
  await options.beforeWrite?.();
  const outcome = await database.tryAdvisoryLock(`gloss:compact:${docId}`, async (tx) => {
    // Deleted meanwhile (a purge): its rows went with it.
    const [doc] = await tx.select({ id: documents.id }).from(documents).where(eq(documents.id, docId));
    if (!doc) return { compacted: false as const, reason: 'nothing-to-fold' as const };
    // Byte equality, not the seq: a fold of rows that added nothing new leaves the same bytes, and a
    // fold that took a late row with a lower seq leaves the same seq but different bytes.
    const [now] = await tx.select({ data: snapshots.data }).from(snapshots).where(eq(snapshots.docId, docId));
    if (!sameBytes(now ? toUint8Array(now.data) : null, read.snapshot?.data ?? null)) return { compacted: false as const, reason: 'raced' as const };
    await tx
      .insert(snapshots)
      .values({ docId, seq, data, bytes: data.length })
      .onConflictDoUpdate({ target: snapshots.docId, set: { seq, data, bytes: data.length, updatedAt: new Date() } });
    const seqs = read.log.map((row) => row.seq);
    for (let i = 0; i < seqs.length; i += DELETE_CHUNK) {
      await tx.delete(updates).where(and(eq(updates.docId, docId), inArray(updates.seq, seqs.slice(i, i + DELETE_CHUNK))));
    }
    return { compacted: true as const, foldedRows: seqs.length, snapshotBytes: data.length, seq };
  });
  return outcome.acquired ? outcome.value : { compacted: false, reason: 'locked' };
}
