/**
 * Rewrites one document's projection rows in one transaction: delete what was there, insert the
 * current rows. A text document's change rewrites the segments of every layer on the text, since a
 * correction moves offsets and quotes.
 */
import {
  type Db,
  documents,
  projectedAttributes,
  projectedCaseTexts,
  projectedCaseValues,
  projectedCases,
  projectedCodes,
  projectedMemos,
  projectedSegments,
  projectionState,
} from '@gloss/db';
import { readTurns } from '@gloss/model';
import { and, eq, inArray, sql } from 'drizzle-orm';
import type * as Y from 'yjs';
import { withDocs, type DocLoader } from './load-doc.js';
import { caseRows, codeRows, memoRows, segmentRows } from './rows.js';

type DocumentRow = typeof documents.$inferSelect;

/** Projects the document `docId` (any kind). Unknown documents are ignored (deleted meanwhile). */
export async function projectDocument(db: Db, store: DocLoader, docId: string): Promise<void> {
  const [doc] = await db.select().from(documents).where(eq(documents.id, docId));
  if (!doc) return;
  switch (doc.kind) {
    case 'text':
    case 'layer':
      return projectLayers(db, store, doc);
    case 'codebook':
      return withDocs(store, [doc.id], ([cb], [seq]) => writeCodebook(db, doc.studyId, cb!, { docId: doc.id, seq: seq!, textSeq: null }));
    case 'memos':
      return withDocs(store, [doc.id], ([m], [seq]) => writeMemos(db, doc.studyId, m!, { docId: doc.id, seq: seq!, textSeq: null }));
  }
}

async function projectLayers(db: Db, store: DocLoader, doc: DocumentRow): Promise<void> {
  const textId = doc.textId!;
  const docsOfText = await db.select().from(documents).where(eq(documents.textId, textId));
  const textDocRow = docsOfText.find((d) => d.kind === 'text');
  if (!textDocRow) return;
  const layers = doc.kind === 'layer' ? [doc] : docsOfText.filter((d) => d.kind === 'layer');
  await withDocs(store, [textDocRow.id, ...layers.map((l) => l.id)], async ([textDoc, ...layerDocs], [textSeq, ...layerSeqs]) => {
    const turns = readTurns(textDoc!);
    const rows = layers.flatMap((l, i) =>
      segmentRows(textDoc!, layerDocs[i]!, { layerDocId: l.id, studyId: l.studyId, textId, coderId: l.coderId }, turns),
    );
    await db.transaction(async (tx) => {
      await lockFor(tx, `text:${textId}`);
      const ids = layers.map((l) => l.id);
      if (ids.length > 0) await tx.delete(projectedSegments).where(inArray(projectedSegments.layerDocId, ids));
      for (const chunk of chunks(rows)) await tx.insert(projectedSegments).values(chunk);
      await recordState(tx, layers.map((l, i) => ({ docId: l.id, seq: layerSeqs[i]!, textSeq: textSeq! })));
    });
  });
}

type StateRow = typeof projectionState.$inferInsert;
type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** Remembers what the rows just written reflect (catch-up.ts reads it at the next start). */
async function recordState(tx: Tx, rows: StateRow[]): Promise<void> {
  for (const chunk of chunks(rows)) {
    await tx
      .insert(projectionState)
      .values(chunk)
      .onConflictDoUpdate({
        target: projectionState.docId,
        set: { seq: sql`excluded.seq`, textSeq: sql`excluded.text_seq`, projectedAt: sql`now()` },
      });
  }
}

async function writeCodebook(db: Db, studyId: string, cb: Y.Doc, state: StateRow): Promise<void> {
  const codes = codeRows(cb, studyId);
  const c = caseRows(cb, studyId);
  await db.transaction(async (tx) => {
    await lockFor(tx, `codebook:${studyId}`);
    for (const table of [projectedCodes, projectedCases, projectedAttributes, projectedCaseValues, projectedCaseTexts]) {
      await tx.delete(table).where(eq(table.studyId, studyId));
    }
    for (const chunk of chunks(codes)) await tx.insert(projectedCodes).values(chunk);
    for (const chunk of chunks(c.cases)) await tx.insert(projectedCases).values(chunk);
    for (const chunk of chunks(c.attributes)) await tx.insert(projectedAttributes).values(chunk);
    for (const chunk of chunks(c.values)) await tx.insert(projectedCaseValues).values(chunk);
    for (const chunk of chunks(c.texts)) await tx.insert(projectedCaseTexts).values(chunk);
    await recordState(tx, [state]);
  });
}

async function writeMemos(db: Db, studyId: string, doc: Y.Doc, state: StateRow): Promise<void> {
  const rows = memoRows(doc, studyId);
  await db.transaction(async (tx) => {
    await lockFor(tx, `memos:${studyId}`);
    await tx.delete(projectedMemos).where(and(eq(projectedMemos.studyId, studyId)));
    for (const chunk of chunks(rows)) await tx.insert(projectedMemos).values(chunk);
    await recordState(tx, [state]);
  });
}

/**
 * Two nodes may project the same rows at once (each projects what it appended). Without a lock, the
 * second transaction's delete would not see the first one's fresh rows and its insert would collide;
 * a transaction-level advisory lock makes them take turns (released at commit).
 */
async function lockFor(tx: { execute: Db['execute'] }, key: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`gloss:projection:${key}`}, 0))`);
}

/** Multi-row inserts in batches that stay under PostgreSQL's 65,535 bind parameters (12 columns x 4,000 rows). */
function* chunks<T>(rows: T[], size = 4000): Generator<T[]> {
  for (let i = 0; i < rows.length; i += size) yield rows.slice(i, i + size);
}
