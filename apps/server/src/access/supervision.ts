/**
 * What supervision says about access (issue 9): the texts assigned to a person (an assignment, or a
 * round they take part in, which assigns its texts to its participants) and the layers a supervisor
 * shared with them (the text's reference, once the comparison is shared). policy.ts decides with it.
 */
import { type Db, roundParticipants, roundTexts, textAssignments, textReferences, texts } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import type { DocSupervision } from './policy.js';

/** Supervision facts for one person across a study: by text id. */
export interface StudySupervision {
  assignedTexts: ReadonlySet<string>;
  shared: ReadonlySet<string>;
  of(textId: string | null): DocSupervision;
}

export async function studySupervision(db: Db, studyId: string, userId: string): Promise<StudySupervision> {
  const [assigned, inRounds, shares] = await Promise.all([
    db
      .select({ textId: textAssignments.textId })
      .from(textAssignments)
      .where(and(eq(textAssignments.studyId, studyId), eq(textAssignments.userId, userId))),
    db
      .select({ textId: roundTexts.textId })
      .from(roundParticipants)
      .innerJoin(roundTexts, eq(roundTexts.roundId, roundParticipants.roundId))
      .innerJoin(texts, eq(texts.id, roundTexts.textId))
      .where(and(eq(roundParticipants.userId, userId), eq(texts.studyId, studyId))),
    db
      .select({ layerDocId: textReferences.layerDocId })
      .from(textAssignments)
      .innerJoin(textReferences, eq(textReferences.textId, textAssignments.textId))
      .where(and(eq(textAssignments.studyId, studyId), eq(textAssignments.userId, userId), eq(textAssignments.comparisonShared, true))),
  ]);
  const assignedTexts = new Set([...assigned, ...inRounds].map((r) => r.textId));
  const shared = new Set(shares.map((r) => r.layerDocId));
  return { assignedTexts, shared, of: (textId) => ({ assigned: textId !== null && assignedTexts.has(textId), shared }) };
}

/** Supervision facts for one person and one text. */
export async function supervisionFor(db: Db, textId: string | null, userId: string): Promise<DocSupervision> {
  if (textId === null) return { assigned: false, shared: new Set() };
  const [assigned, inRound, share] = await Promise.all([
    db
      .select({ shared: textAssignments.comparisonShared })
      .from(textAssignments)
      .where(and(eq(textAssignments.textId, textId), eq(textAssignments.userId, userId))),
    db
      .select({ roundId: roundTexts.roundId })
      .from(roundTexts)
      .innerJoin(roundParticipants, and(eq(roundParticipants.roundId, roundTexts.roundId), eq(roundParticipants.userId, userId)))
      .where(eq(roundTexts.textId, textId))
      .limit(1),
    db.select({ layerDocId: textReferences.layerDocId }).from(textReferences).where(eq(textReferences.textId, textId)),
  ]);
  const shared = assigned[0]?.shared && share[0] ? new Set([share[0].layerDocId]) : new Set<string>();
  return { assigned: assigned.length > 0 || inRound.length > 0, shared };
}
