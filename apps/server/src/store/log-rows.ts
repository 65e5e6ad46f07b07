/**
 * Reads a document's snapshot and log rows in one statement, so a compaction committing meanwhile
 * cannot make rows vanish between two reads (read committed: one statement, one snapshot).
 */
import { rowsOf, toUint8Array, type Db } from '@gloss/db';
import { sql } from 'drizzle-orm';

export const FULL_READ = -1;

export interface LogRead {
  snapshot: { seq: number; data: Uint8Array } | null;
  log: Array<{ seq: number; data: Uint8Array }>;
}

/**
 * Snapshot (only if its seq > afterSeq) and log rows with seq > afterSeq, in seq order.
 * FULL_READ takes everything, including a snapshot written with seq 0 (e.g. by an importer).
 */
export async function readLog(db: Db, docId: string, afterSeq: number): Promise<LogRead> {
  const result = await db.execute(sql`
    select 0 as part, seq, data from snapshots where doc_id = ${docId} and seq > ${afterSeq}
    union all
    select 1 as part, seq, data from updates where doc_id = ${docId} and seq > ${afterSeq}
    order by part, seq`);
  const read: LogRead = { snapshot: null, log: [] };
  for (const row of rowsOf<{ part: number | string; seq: number | string; data: unknown }>(result)) {
    const entry = { seq: Number(row.seq), data: toUint8Array(row.data) };
    if (Number(row.part) === 0) read.snapshot = entry;
    else read.log.push(entry);
  }
  return read;
}

/** The updates of a read in order (snapshot first, its seqs entry 0) and the highest seq included (at least afterSeq). */
export function flatten(read: LogRead, afterSeq: number): { updates: Uint8Array[]; seq: number; seqs: number[] } {
  const updates: Uint8Array[] = [];
  const seqs: number[] = [];
  let seq = afterSeq;
  if (read.snapshot !== null) {
    updates.push(read.snapshot.data);
    seqs.push(0); // a snapshot folds many rows: it has no single seq a reader may already have applied
    seq = Math.max(seq, read.snapshot.seq);
  }
  for (const row of read.log) {
    updates.push(row.data);
    seqs.push(row.seq);
    seq = Math.max(seq, row.seq);
  }
  return { updates, seq, seqs };
}
