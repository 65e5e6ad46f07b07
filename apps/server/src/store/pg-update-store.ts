/**
 * The durable UpdateStore on PGlite or PostgreSQL: group commit of appends (one multi-row INSERT …
 * RETURNING seq per batch, across documents), and compaction when a document's log outgrows its
 * snapshot, run off the append path.
 */
import type { Database } from '@gloss/db';
import type { UpdateStore } from '../sync/contracts.js';
import { compactDocument, type CompactionResult } from './compaction.js';
import { mergeOffThread } from './merge-off-thread.js';
import { StoreError } from './errors.js';
import { GroupCommit } from './group-commit.js';
import { insertBatch, insertBatchPostgres, pgliteClientOf, postgresClientOf, type LogRow } from './insert-batch.js';
import { isUuid } from '../ids.js';
import { FULL_READ, flatten, readLog } from './log-rows.js';
import { createPendingByKey } from './pending-by-key.js';

export interface PgUpdateStoreOptions {
  /** Most rows in one INSERT (default 2,000). */
  maxBatch?: number;
  /**
   * While appends arrive faster than one per this many ms, wait this long before a commit so it
   * carries more rows (group-commit.ts). Default: 5 ms on PGlite (each statement costs ~0.7 ms of this
   * process's CPU, and each batch is one socket write per peer; at 50 clients x 5 edits/s arrivals are
   * 4 ms apart, so batches there hold about two), 0 on PostgreSQL (its commits run off this process,
   * so appends queue up behind the one in flight by themselves).
   */
  commitDelayMs?: number;
  /** Fold when the log's bytes pass the snapshot's and at least this many (default 64 KiB); 0 disables. */
  compactMinBytes?: number;
  onCompactionError?: (error: unknown, docId: string) => void;
  /** Merge a fold's updates on a thread of its own (default true; false merges in the calling thread). */
  mergeOffThread?: boolean;
}

export interface PgUpdateStore extends UpdateStore {
  /** Folds one document now (tests, admin). */
  compact(docId: string): Promise<CompactionResult>;
  /** Resolves when no compaction is running. */
  compactionsIdle(): Promise<void>;
  /** Commits (INSERT statements) and rows so far: rows / batches is the group-commit factor. */
  stats(): { batches: number; rows: number; compactions: number };
}

/** Byte counts of documents seen by this node; other nodes' appends and folds make them estimates. */
interface Sizes {
  logBytes: number;
  snapshotBytes: number;
}

export function createPgUpdateStore(database: Database, options: PgUpdateStoreOptions = {}): PgUpdateStore {
  const compactMinBytes = options.compactMinBytes ?? 64 * 1024;
  const sizes = new Map<string, Sizes>();
  const compacting = new Map<string, Promise<unknown>>();
  /** Appends submitted and not settled yet, per document (queued or in the batch being written). */
  const inFlight = createPendingByKey();
  let closed = false;
  const counts = { batches: 0, rows: 0, compactions: 0 };
  const merger = options.mergeOffThread === false ? null : mergeOffThread();

  const pglite = database.kind === 'pglite' ? pgliteClientOf(database.db) : null;
  const postgres = database.kind === 'postgres' ? postgresClientOf(database.db) : null;
  const commits = new GroupCommit<LogRow, number | null>(async (rows) => {
    const seqs = postgres !== null ? await insertBatchPostgres(postgres, rows) : await insertBatch(database.db, rows, pglite);
    counts.batches++;
    counts.rows += rows.length;
    rows.forEach((row, i) => seqs[i] !== null && noteAppend(row.docId, row.data.length));
    return seqs;
  }, options.maxBatch ?? 2_000, options.commitDelayMs ?? (database.kind === 'pglite' ? 5 : 0));

  function noteAppend(docId: string, bytes: number): void {
    const size = sizes.get(docId);
    if (size === undefined) return;
    size.logBytes += bytes;
    if (compactMinBytes > 0 && size.logBytes > Math.max(size.snapshotBytes, compactMinBytes)) scheduleCompaction(docId);
  }

  function scheduleCompaction(docId: string): void {
    if (compacting.has(docId) || closed) return;
    const run = new Promise((resolve) => setImmediate(resolve))
      .then(() => compact(docId))
      .catch((error: unknown) => options.onCompactionError?.(error, docId))
      .finally(() => compacting.delete(docId));
    compacting.set(docId, run);
  }

  async function compact(docId: string): Promise<CompactionResult> {
    const result = await compactDocument(database, docId, merger ? { merge: (parts) => merger.merge(parts) } : {});
    if (result.compacted) counts.compactions++;
    const size = sizes.get(docId);
    if (result.compacted && size !== undefined) {
      size.snapshotBytes = result.snapshotBytes;
      size.logBytes = 0;
    }
    return result;
  }

  return {
    async load(docId) {
      const read = await readLog(database.db, docId, FULL_READ);
      sizes.set(docId, {
        snapshotBytes: read.snapshot?.data.length ?? 0,
        logBytes: read.log.reduce((sum, row) => sum + row.data.length, 0),
      });
      return flatten(read, 0);
    },
    append(docId, update, userId) {
      if (closed) return Promise.reject(new StoreError('store-closed', 'update store is closed'));
      // Checked here too, so one bad id fails its own append rather than everyone's batch.
      if (!isUuid(docId) || (userId !== null && !isUuid(userId))) {
        return Promise.reject(new StoreError('append-failed', `not a UUID: ${docId} / ${userId}`));
      }
      return inFlight.track(
        docId,
        commits.submit({ docId, data: update, userId }).then((seq) => {
          if (seq === null) throw new StoreError('document-gone', `document ${docId} was deleted or replaced; the update was not stored`);
          return seq;
        }),
      );
    },
    async since(docId, seq) {
      return flatten(await readLog(database.db, docId, seq), seq);
    },
    flush: () => commits.flush(),
    flushDoc: (docId) => inFlight.settled(docId),
    compact,
    stats: () => ({ ...counts }),
    async compactionsIdle() {
      while (compacting.size > 0) await Promise.allSettled([...compacting.values()]);
    },
    async close() {
      closed = true;
      await commits.flush();
      await Promise.allSettled([...compacting.values()]);
      await merger?.close();
    },
  };
}
