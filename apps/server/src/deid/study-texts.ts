/** The text documents of a study and the layers on each: what de-identification reads and writes. */
import { documents, texts, type Db } from '@gloss/db';
import { and, asc, eq } from 'drizzle-orm';

export interface StudyText {
  textId: string;
  title: string;
  docId: string;
  layerIds: string[];
}

export async function studyTexts(db: Db, studyId: string): Promise<StudyText[]> {
  const rows = await db
    .select({ textId: texts.id, title: texts.title, docId: documents.id, kind: documents.kind })
    .from(texts)
    .innerJoin(documents, eq(documents.textId, texts.id))
    .where(and(eq(texts.studyId, studyId)))
    .orderBy(asc(texts.createdAt));
  const out = new Map<string, StudyText>();
  for (const r of rows) {
    const entry = out.get(r.textId) ?? { textId: r.textId, title: r.title, docId: '', layerIds: [] };
    if (r.kind === 'text') entry.docId = r.docId;
    else entry.layerIds.push(r.docId);
    out.set(r.textId, entry);
  }
  return [...out.values()].filter((t) => t.docId !== '');
}
