/**
 * Where a study's words live besides its transcripts, for finding and replacing identifiers there too:
 * the codebook and memos documents (one each per study), segment notes in layers, comments on
 * segments (a table), and the texts' titles.
 */
import { documents, segmentComments, texts, type Db } from '@gloss/db';
import { and, asc, eq, inArray } from 'drizzle-orm';

/** Where a candidate was found, in the reviewer's words. */
export const PLACES = { texts: 'texts', codebook: 'codebook', memos: 'memos', notes: 'segment notes', comments: 'comments', titles: 'text titles' } as const;
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
