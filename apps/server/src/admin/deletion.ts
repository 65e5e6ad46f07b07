/**
 * Deleting a study or a text (DESIGN §8): every row of it goes in one transaction — texts, documents
 * with their update log, snapshots and named versions, projections, comments, rounds' rows, cases,
 * the pseudonym key — through the schema's cascading foreign keys plus the few columns that hold an
 * id without one (case_texts.text_id, audit_log.study_id). A deleted study leaves one audit entry that
 * names only ids and counts; a deleted text leaves the study's earlier entries about it without their
 * details (titles), plus the deletion's entry.
 */
import { auditLog, documents, projectedCaseTexts, studies, texts, type Db } from '@gloss/db';
import { and, count, eq, inArray } from 'drizzle-orm';
import { missing } from './errors.js';
import { recordAudit } from './audit.js';

export interface Deleted {
  /** Document ids (sync rooms) that no longer exist: their open connections must be closed. */
  docIds: string[];
  texts: number;
}

export async function deleteStudy(db: Db, studyId: string, by: string | null): Promise<Deleted> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [study] = await t.select({ id: studies.id }).from(studies).where(eq(studies.id, studyId));
    if (!study) throw missing('Study');
    const docs = await t.select({ id: documents.id }).from(documents).where(eq(documents.studyId, studyId));
    const [n] = await t.select({ n: count() }).from(texts).where(eq(texts.studyId, studyId));
    // Earlier audit entries may carry titles and settings: the study's record goes with it.
    await t.delete(auditLog).where(eq(auditLog.studyId, studyId));
    await t.delete(studies).where(eq(studies.id, studyId));
    await recordAudit(t, { userId: by, studyId, action: 'study.delete', target: studyId, detail: { texts: n?.n ?? 0, documents: docs.length } });
    return { docIds: docs.map((d) => d.id), texts: n?.n ?? 0 };
  });
}

export async function deleteText(db: Db, textId: string, by: string | null): Promise<Deleted & { studyId: string }> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [text] = await t.select({ studyId: texts.studyId }).from(texts).where(eq(texts.id, textId));
    if (!text) throw missing('Text');
    const docs = await t.select({ id: documents.id }).from(documents).where(eq(documents.textId, textId));
    // case_texts keeps the text id as a model id (text), without a foreign key.
    await t.delete(projectedCaseTexts).where(and(eq(projectedCaseTexts.studyId, text.studyId), eq(projectedCaseTexts.textId, textId)));
    await t.delete(texts).where(eq(texts.id, textId));
    // The study's log keeps who did what to the text and when, but not the details (a title, words).
    const targets = [textId, ...docs.map((d) => d.id)];
    await t.update(auditLog).set({ detail: null }).where(and(eq(auditLog.studyId, text.studyId), inArray(auditLog.target, targets)));
    await recordAudit(t, { userId: by, studyId: text.studyId, action: 'text.delete', target: textId, detail: { documents: docs.length } });
    return { docIds: docs.map((d) => d.id), texts: 1, studyId: text.studyId };
  });
}
