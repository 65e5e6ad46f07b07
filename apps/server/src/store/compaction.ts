/**
 * Folds a document's log into its snapshot: one transaction, under an advisory lock per document so
 * two nodes never fold the same document at once. Only the rows actually read are deleted, so a row
 * that commits during the fold (with a lower seq) stays in the log.
 */
import { snapshots, updates, type Database } from '@gloss/db';
import { and, eq, inArray } from 'drizzle-orm';
import * as Y from 'yjs';
import { FULL_READ, readLog } from './log-rows.js';

export type CompactionResult =
  | { compacted: true; foldedRows: number; snapshotBytes: number; seq: number }
  | { compacted: false; reason: 'locked' | 'nothing-to-fold' };

const DELETE_CHUNK = 5_000;

export async function compactDocument(database: Database, docId: string): Promise<CompactionResult> {
  const outcome = await database.tryAdvisoryLock(`gloss:compact:${docId}`, async (tx) => {
    const read = await readLog(tx, docId, FULL_READ);
    if (read.log.length === 0) return { compacted: false as const, reason: 'nothing-to-fold' as const };
    const parts = read.snapshot === null ? [] : [read.snapshot.data];
    let seq = read.snapshot?.seq ?? 0;
    for (const row of read.log) {
      parts.push(row.data);
      seq = Math.max(seq, row.seq);
    }
    const data = Y.mergeUpdates(parts);
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
