/**
 * Supervision rows (issue 9): assignments of texts to people with their review state, the reference
 * layer per text, and a study's settings. Plain queries; rights are the routes' business.
 */
import { type Db, type ReviewState, documents, memberships, supervisionSettings, textAssignments, textReferences, texts, users } from '@gloss/db';
import { and, asc, eq } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';

export interface AssignmentOut {
  textId: string;
  textTitle: string;
  userId: string;
  userName: string;
  role: string;
  assignedAt: string;
  reviewState: ReviewState;
  reviewNote: string;
  reviewedAt: string | null;
  reviewedBy: string | null;
  comparisonShared: boolean;
  /** The text's reference layer room, if the supervisor chose one. */
  reference: string | null;
}

export const DEFAULT_SETTINGS = { toleranceWords: 2, driftThreshold: 0.1 } as const;

export async function settingsOf(db: Db, studyId: string): Promise<{ toleranceWords: number; driftThreshold: number }> {
  const [row] = await db.select().from(supervisionSettings).where(eq(supervisionSettings.studyId, studyId));
  return row ? { toleranceWords: row.toleranceWords, driftThreshold: row.driftThreshold } : { ...DEFAULT_SETTINGS };
}

export async function saveSettings(db: Db, studyId: string, s: { toleranceWords: number; driftThreshold: number }): Promise<void> {
  await db.insert(supervisionSettings).values({ studyId, ...s }).onConflictDoUpdate({ target: supervisionSettings.studyId, set: s });
}

/** The study's assignments; with `userId`, only that person's. */
export async function listAssignments(db: Db, studyId: string, userId?: string): Promise<AssignmentOut[]> {
  const assignee = alias(users, 'assignee');
  const rows = await db
    .select({ a: textAssignments, title: texts.title, name: assignee.name, role: memberships.role, reference: textReferences.layerDocId })
    .from(textAssignments)
    .innerJoin(texts, eq(texts.id, textAssignments.textId))
    .innerJoin(assignee, eq(assignee.id, textAssignments.userId))
    .leftJoin(memberships, and(eq(memberships.studyId, textAssignments.studyId), eq(memberships.userId, textAssignments.userId)))
    .leftJoin(textReferences, eq(textReferences.textId, textAssignments.textId))
    .where(userId ? and(eq(textAssignments.studyId, studyId), eq(textAssignments.userId, userId)) : eq(textAssignments.studyId, studyId))
    .orderBy(asc(texts.createdAt), asc(texts.title), asc(assignee.name));
  return rows.map(({ a, title, name, role, reference }) => ({
    textId: a.textId,
    textTitle: title,
    userId: a.userId,
    userName: name,
    role: role ?? '',
    assignedAt: a.assignedAt.toISOString(),
    reviewState: a.reviewState,
    reviewNote: a.reviewNote,
    reviewedAt: a.reviewedAt?.toISOString() ?? null,
    reviewedBy: a.reviewedBy,
    comparisonShared: a.comparisonShared,
    reference,
  }));
}

export async function findAssignment(db: Db, textId: string, userId: string) {
  const [row] = await db.select().from(textAssignments).where(and(eq(textAssignments.textId, textId), eq(textAssignments.userId, userId)));
  return row ?? null;
}

/** Assigns (idempotent: an existing assignment keeps its review state). */
export async function assignText(db: Db, a: { studyId: string; textId: string; userId: string; assignedBy: string | null }): Promise<void> {
  await db.insert(textAssignments).values(a).onConflictDoNothing();
}

export async function unassignText(db: Db, textId: string, userId: string): Promise<boolean> {
  const rows = await db.delete(textAssignments).where(and(eq(textAssignments.textId, textId), eq(textAssignments.userId, userId))).returning({ t: textAssignments.textId });
  return rows.length > 0;
}

export async function setReview(db: Db, textId: string, userId: string, r: { state: ReviewState; note: string; by: string }): Promise<void> {
  await db
    .update(textAssignments)
    .set({ reviewState: r.state, reviewNote: r.note, reviewedBy: r.by, reviewedAt: new Date() })
    .where(and(eq(textAssignments.textId, textId), eq(textAssignments.userId, userId)));
}

export async function setShared(db: Db, textId: string, userId: string, shared: boolean): Promise<void> {
  await db.update(textAssignments).set({ comparisonShared: shared }).where(and(eq(textAssignments.textId, textId), eq(textAssignments.userId, userId)));
}

export async function referenceOf(db: Db, textId: string): Promise<string | null> {
  const [row] = await db.select({ id: textReferences.layerDocId }).from(textReferences).where(eq(textReferences.textId, textId));
  return row?.id ?? null;
}

export async function setReference(db: Db, textId: string, layerDocId: string | null, by: string): Promise<void> {
  if (layerDocId === null) {
    await db.delete(textReferences).where(eq(textReferences.textId, textId));
    return;
  }
  await db
    .insert(textReferences)
    .values({ textId, layerDocId, chosenBy: by })
    .onConflictDoUpdate({ target: textReferences.textId, set: { layerDocId, chosenBy: by, chosenAt: new Date() } });
}

/**
 * Every room of a text (its text document and layers) and its study's memos room, whose entries on the
 * text a reader may or may not receive (access/memo-view.ts): what an assignment change re-checks.
 */
export async function roomsOfText(db: Db, textId: string): Promise<string[]> {
  const own = (await db.select({ id: documents.id }).from(documents).where(eq(documents.textId, textId))).map((r) => r.id);
  const memos = await db
    .select({ id: documents.id })
    .from(documents)
    .innerJoin(texts, eq(texts.studyId, documents.studyId))
    .where(and(eq(texts.id, textId), eq(documents.kind, 'memos')));
  return [...own, ...memos.map((r) => r.id)];
}
