/**
 * What rounds say about access (issue 8): the round a layer belongs to, and the open round a text is
 * in. A text is in at most one open (independent or revealed) round at a time (rounds routes refuse a
 * second), so "the open round of a text" is one row or none.
 */
import { type Db, roundParticipants, roundTexts, rounds, type RoundPhase } from '@gloss/db';
import { and, eq, inArray, ne } from 'drizzle-orm';
import type { DocKind, Role } from '../sync/contracts.js';
import { documentAccess, type DocumentAccess } from './policy.js';
import { supervisionFor } from './supervision.js';

export interface RoundFacts {
  id: string;
  studyId: string;
  phase: RoundPhase;
  participants: ReadonlySet<string>;
}

async function participantsOf(db: Db, roundId: string): Promise<Set<string>> {
  const rows = await db.select({ userId: roundParticipants.userId }).from(roundParticipants).where(eq(roundParticipants.roundId, roundId));
  return new Set(rows.map((r) => r.userId));
}

export async function roundFacts(db: Db, roundId: string): Promise<RoundFacts | null> {
  const [row] = await db.select({ id: rounds.id, studyId: rounds.studyId, phase: rounds.phase }).from(rounds).where(eq(rounds.id, roundId));
  return row ? { ...row, participants: await participantsOf(db, row.id) } : null;
}

/** The round (independent or revealed) that `textId` is in now, if any. */
export async function openRoundOfText(db: Db, textId: string): Promise<RoundFacts | null> {
  const [row] = await db
    .select({ id: rounds.id, studyId: rounds.studyId, phase: rounds.phase })
    .from(roundTexts)
    .innerJoin(rounds, eq(rounds.id, roundTexts.roundId))
    .where(and(eq(roundTexts.textId, textId), ne(rounds.phase, 'closed')))
    .limit(1);
  return row ? { ...row, participants: await participantsOf(db, row.id) } : null;
}

/** Round context for deciding about one document: its own round (a round layer) and its text's open round. */
export interface DocRounds {
  layerRound: RoundFacts | null;
  openRound: RoundFacts | null;
}

export async function roundsForDocument(db: Db, doc: { textId: string | null; roundId: string | null }): Promise<DocRounds> {
  const openRound = doc.textId ? await openRoundOfText(db, doc.textId) : null;
  const layerRound = doc.roundId === null ? null : openRound?.id === doc.roundId ? openRound : await roundFacts(db, doc.roundId);
  return { layerRound, openRound };
}

/** The access decision for one document row, rounds and supervision included (policy.ts `documentAccess`). */
export async function decideDocument(
  db: Db,
  doc: { id: string; kind: DocKind; coderId: string | null; textId: string | null; roundId: string | null },
  role: Role,
  userId: string,
): Promise<DocumentAccess> {
  const [rounds, supervision] = await Promise.all([roundsForDocument(db, doc), supervisionFor(db, doc.textId, userId)]);
  return documentAccess(role, doc, userId, rounds, supervision);
}

/** Every round of a study (for deciding about many layers at once): by id, and the open one per text. */
export async function studyRounds(db: Db, studyId: string): Promise<{ byId: Map<string, RoundFacts>; openByText: Map<string, RoundFacts> }> {
  const rows = await db.select({ id: rounds.id, studyId: rounds.studyId, phase: rounds.phase }).from(rounds).where(eq(rounds.studyId, studyId));
  const byId = new Map<string, RoundFacts>();
  for (const r of rows) byId.set(r.id, { ...r, participants: await participantsOf(db, r.id) });
  const openByText = new Map<string, RoundFacts>();
  const open = rows.filter((r) => r.phase !== 'closed').map((r) => r.id);
  if (open.length) {
    const ts = await db.select({ roundId: roundTexts.roundId, textId: roundTexts.textId }).from(roundTexts).where(inArray(roundTexts.roundId, open));
    for (const t of ts) openByText.set(t.textId, byId.get(t.roundId)!);
  }
  return { byId, openByText };
}
