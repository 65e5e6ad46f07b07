/**
 * Where a study's words live besides its transcripts, for finding and replacing identifiers there too:
 * the codebook and memos documents (one each per study), segment notes in layers, comments on
 * segments (a table), the texts' titles, the study's own title, description and ethics note, and its
 * rounds' names and purposes (a site or a ward is often named there).
 */
import { auditLog, documents, rounds, segmentComments, studies, texts, type Db } from '@gloss/db';
import { and, asc, eq, inArray, or, sql } from 'drizzle-orm';

/** Where a candidate was found, in the reviewer's words. */
export const PLACES = { texts: 'texts', codebook: 'codebook', memos: 'memos', notes: 'segment notes', comments: 'comments', titles: 'text titles', study: 'study details', rounds: 'round names' } as const;
export type Place = (typeof PLACES)[keyof typeof PLACES];

/** The study's codebook and memos documents (ids), when they exist. */
export async function studySharedDocs(db: Db, studyId: string): Promise<Array<{ id: string; kind: 'codebook' | 'memos' }>> {
  const rows = await db
    .select({ id: documents.id, kind: documents.kind })
    .from(documents)
    .where(and(eq(documents.studyId, studyId), inArray(documents.kind, ['codebook', 'memos'])));
  return rows as Array<{ id: string; kind: 'codebook' | 'memos' }>;
}

export async function studyComments(db: Db, studyId: string): Promise<Array<{ id: string; body: string }>> {
  return db.select({ id: segmentComments.id, body: segmentComments.body }).from(segmentComments).where(eq(segmentComments.studyId, studyId)).orderBy(asc(segmentComments.createdAt));
}

export async function studyTitles(db: Db, studyId: string): Promise<Array<{ id: string; title: string }>> {
  return db.select({ id: texts.id, title: texts.title }).from(texts).where(eq(texts.studyId, studyId));
}

/** The study's title, description and ethics note, as one row (none when the study is gone). */
export async function studyDetails(db: Db, studyId: string): Promise<{ title: string; description: string; ethicsNote: string } | undefined> {
  const [row] = await db.select({ title: studies.title, description: studies.description, ethicsNote: studies.ethicsNote }).from(studies).where(eq(studies.id, studyId));
  return row;
}

export async function studyRounds(db: Db, studyId: string): Promise<Array<{ id: string; name: string; purpose: string }>> {
  return db.select({ id: rounds.id, name: rounds.name, purpose: rounds.purpose }).from(rounds).where(eq(rounds.studyId, studyId)).orderBy(asc(rounds.number));
}

/**
 * The study's audit entries whose details hold any of `originals`. Entries keep names as they were (a
 * round's name when it was revealed, the study's title when it was made), so replacing an identifier
 * must reach them too. The log can be long: only entries that may match leave the database.
 */
export async function studyAuditDetails(db: Db, studyId: string, originals: readonly string[]): Promise<Array<{ id: number; detail: Record<string, unknown> | null }>> {
  const wanted = originals.filter((o) => o.length > 0);
  if (wanted.length === 0) return [];
  const mayHold = or(...wanted.map((o) => sql`strpos(${auditLog.detail}::text, ${o}) > 0`));
  return db.select({ id: auditLog.id, detail: auditLog.detail }).from(auditLog).where(and(eq(auditLog.studyId, studyId), mayHold)).orderBy(asc(auditLog.id));
}
