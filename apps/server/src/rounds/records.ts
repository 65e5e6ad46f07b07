/**
 * Calibration rounds in the database: creating one (its texts, participants, one layer per participant
 * and text, one consensus layer per text), moving it through its phases, and reading it back.
 * Phases: independent -> revealed -> closed. A text is in at most one open round at a time.
 */
import {
  type Db,
  type RoundPhase,
  type RoundRow,
  documents,
  memberships,
  roundDone,
  roundParticipants,
  roundReading,
  roundTexts,
  rounds,
  texts,
  users,
  versions,
} from '@gloss/db';
import { and, asc, eq, inArray, ne, sql } from 'drizzle-orm';
import { can } from '../access/policy.js';
import { recordAudit } from '../admin/audit.js';
import { HttpError, conflict, notFound } from '../errors.js';

export interface NewRound {
  studyId: string;
  name: string;
  purpose: string;
  textIds: string[];
  participantIds: string[];
  unit: string;
  statistic: string;
  createdBy: string;
  /** The codebook in force (its document and a Yjs snapshot of it), kept as a named version of it. */
  codebook: { docId: string; snapshot: Uint8Array } | null;
}

/** Checks a new round's texts and participants against the study; throws a 400/409 that says what is wrong. */
export async function checkNewRound(db: Db, input: Pick<NewRound, 'studyId' | 'textIds' | 'participantIds'>): Promise<void> {
  const found = await db.select({ id: texts.id }).from(texts).where(and(eq(texts.studyId, input.studyId), inArray(texts.id, input.textIds)));
  const missing = input.textIds.filter((id) => !found.some((t) => t.id === id));
  if (missing.length) throw new HttpError(400, 'invalid_body', `textIds: ${missing.join(', ')} ${missing.length === 1 ? 'is' : 'are'} not a text of this study.`);
  const members = await db
    .select({ userId: memberships.userId, role: memberships.role, name: users.name })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.studyId, input.studyId), inArray(memberships.userId, input.participantIds)));
  const notMembers = input.participantIds.filter((id) => !members.some((m) => m.userId === id));
  if (notMembers.length) throw new HttpError(400, 'invalid_body', `participantIds: ${notMembers.join(', ')} ${notMembers.length === 1 ? 'is' : 'are'} not a member of this study.`);
  const cannotCode = members.filter((m) => !can(m.role, 'layer.writeOwn'));
  if (cannotCode.length) {
    throw new HttpError(400, 'invalid_body', `participantIds: ${cannotCode.map((m) => `${m.name} (${m.role})`).join(', ')} may not code in this study, so cannot take part.`);
  }
  const busy = await db
    .select({ textId: roundTexts.textId, title: texts.title, round: rounds.name })
    .from(roundTexts)
    .innerJoin(rounds, eq(rounds.id, roundTexts.roundId))
    .innerJoin(texts, eq(texts.id, roundTexts.textId))
    .where(and(inArray(roundTexts.textId, input.textIds), ne(rounds.phase, 'closed')));
  if (busy.length) {
    throw conflict(`${busy.map((b) => `“${b.title}” is in the open round “${b.round}”`).join('; ')}. Close that round first: a text is in one open round at a time.`);
  }
}

/** Inserts the round, its texts, participants and layers in one transaction; audits the start. */
export async function insertRound(db: Db, input: NewRound): Promise<RoundRow> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    // Serialises round numbering per study (both drivers): the study row is locked until commit.
    await t.execute(sql`select id from studies where id = ${input.studyId} for update`);
    const [{ next } = { next: 1 }] = await t
      .select({ next: sql<number>`coalesce(max(${rounds.number}), 0) + 1` })
      .from(rounds)
      .where(eq(rounds.studyId, input.studyId));
    const [round] = await t
      .insert(rounds)
      .values({
        studyId: input.studyId,
        number: Number(next),
        name: input.name,
        purpose: input.purpose,
        unit: input.unit,
        statistic: input.statistic,
        createdBy: input.createdBy,
      })
      .returning();
    let r = round!;
    if (input.codebook) {
      const [v] = await t
        .insert(versions)
        .values({ docId: input.codebook.docId, name: `Round ${r.number} (${r.name}): codebook at the start`, snapshot: input.codebook.snapshot, createdBy: input.createdBy })
        .returning({ id: versions.id });
      [r] = (await t.update(rounds).set({ codebookVersionId: v!.id }).where(eq(rounds.id, r.id)).returning()) as [RoundRow];
    }
    await t.insert(roundTexts).values(input.textIds.map((textId, position) => ({ roundId: r.id, textId, position })));
    await t.insert(roundParticipants).values(input.participantIds.map((userId) => ({ roundId: r.id, userId })));
    await t.insert(documents).values(
      input.textIds.flatMap((textId) => [
        ...input.participantIds.map((coderId) => ({ kind: 'layer' as const, studyId: input.studyId, textId, coderId, roundId: r.id })),
        { kind: 'layer' as const, studyId: input.studyId, textId, coderId: null, roundId: r.id },
      ]),
    );
    await recordAudit(t, {
      userId: input.createdBy,
      studyId: input.studyId,
      action: 'round.start',
      target: r.id,
      detail: { name: r.name, number: r.number, texts: input.textIds, participants: input.participantIds, unit: r.unit, statistic: r.statistic },
    });
    return r;
  });
}

const NEXT: Record<RoundPhase, RoundPhase | null> = { independent: 'revealed', revealed: 'closed', closed: null };

/** Moves a round one phase on (reveal or close); 409 when it is not in the phase before. */
export async function advanceRound(db: Db, roundId: string, to: 'revealed' | 'closed', by: string): Promise<RoundRow> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [row] = await t.select().from(rounds).where(eq(rounds.id, roundId)).for('update');
    if (!row) throw notFound('Round');
    if (NEXT[row.phase] !== to) {
      const what = to === 'revealed' ? 'revealed' : 'closed';
      throw conflict(
        row.phase === to
          ? `This round is already ${what}.`
          : to === 'revealed'
            ? 'Only a round in its independent phase can be revealed.'
            : 'Only a revealed round can be closed: reveal it first.',
      );
    }
    const now = new Date();
    const [updated] = await t
      .update(rounds)
      .set(to === 'revealed' ? { phase: to, revealedAt: now } : { phase: to, closedAt: now })
      .where(eq(rounds.id, roundId))
      .returning();
    await recordAudit(t, { userId: by, studyId: row.studyId, action: to === 'revealed' ? 'round.reveal' : 'round.close', target: roundId, detail: { name: row.name, number: row.number } });
    return updated!;
  });
}

export async function findRound(db: Db, roundId: string): Promise<RoundRow | null> {
  const [row] = await db.select().from(rounds).where(eq(rounds.id, roundId));
  return row ?? null;
}

export async function roundsOfStudy(db: Db, studyId: string): Promise<RoundRow[]> {
  return db.select().from(rounds).where(eq(rounds.studyId, studyId)).orderBy(asc(rounds.number));
}

export interface RoundMembers {
  texts: Array<{ id: string; title: string; wordCount: number }>;
  participants: Array<{ id: string; name: string }>;
}

export async function roundMembers(db: Db, roundIds: string[]): Promise<Map<string, RoundMembers>> {
  const out = new Map<string, RoundMembers>(roundIds.map((id) => [id, { texts: [], participants: [] }]));
  if (roundIds.length === 0) return out;
  const ts = await db
    .select({ roundId: roundTexts.roundId, id: texts.id, title: texts.title, wordCount: texts.wordCount })
    .from(roundTexts)
    .innerJoin(texts, eq(texts.id, roundTexts.textId))
    .where(inArray(roundTexts.roundId, roundIds))
    .orderBy(asc(roundTexts.position));
  for (const { roundId, ...t } of ts) out.get(roundId)!.texts.push(t);
  const ps = await db
    .select({ roundId: roundParticipants.roundId, id: users.id, name: users.name })
    .from(roundParticipants)
    .innerJoin(users, eq(users.id, roundParticipants.userId))
    .where(inArray(roundParticipants.roundId, roundIds))
    .orderBy(asc(users.name), asc(users.id));
  for (const { roundId, ...p } of ps) out.get(roundId)!.participants.push(p);
  return out;
}

/** The layer documents of a round: per text, each participant's and the consensus layer (coderId null). */
export async function roundLayers(db: Db, roundId: string) {
  return db
    .select({ id: documents.id, textId: documents.textId, coderId: documents.coderId, roundId: documents.roundId, kind: documents.kind, studyId: documents.studyId })
    .from(documents)
    .where(and(eq(documents.roundId, roundId), eq(documents.kind, 'layer')));
}

export async function doneMarks(db: Db, roundId: string) {
  return db.select().from(roundDone).where(eq(roundDone.roundId, roundId));
}

/** A participant marks a round text done (or not done again) during the independent phase. */
export async function setDone(db: Db, round: RoundRow, textId: string, userId: string, done: boolean): Promise<Date | null> {
  if (round.phase !== 'independent') throw conflict('Texts are marked done during the independent phase only.');
  if (done) {
    const [row] = await db
      .insert(roundDone)
      .values({ roundId: round.id, textId, userId })
      .onConflictDoUpdate({ target: [roundDone.roundId, roundDone.textId, roundDone.userId], set: { doneAt: sql`${roundDone.doneAt}` } })
      .returning();
    return row!.doneAt;
  }
  await db.delete(roundDone).where(and(eq(roundDone.roundId, round.id), eq(roundDone.textId, textId), eq(roundDone.userId, userId)));
  return null;
}

export async function readingMarks(db: Db, roundId: string) {
  return db.select().from(roundReading).where(eq(roundReading.roundId, roundId));
}

/**
 * A participant's browser reports how many words of a round text have been on their screen; the
 * figure only grows (a report lower than the stored one changes nothing) and never passes the text's
 * length. Independent phase only: after the reveal, reading is no longer independent work.
 */
export async function setWordsRead(db: Db, round: RoundRow, text: { id: string; wordCount: number }, userId: string, words: number): Promise<number> {
  if (round.phase !== 'independent') throw conflict('Reading is counted during the independent phase only.');
  const n = Math.min(Math.max(0, Math.floor(words)), text.wordCount);
  const [row] = await db
    .insert(roundReading)
    .values({ roundId: round.id, textId: text.id, userId, wordsRead: n })
    .onConflictDoUpdate({
      target: [roundReading.roundId, roundReading.textId, roundReading.userId],
      set: { wordsRead: sql`greatest(${roundReading.wordsRead}, excluded.words_read)`, updatedAt: sql`now()` },
    })
    .returning();
  return row!.wordsRead;
}
