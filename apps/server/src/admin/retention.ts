/** Studies whose retention date has passed or is near (DESIGN §8: set a retention date, delete when it passes). */
import { type Db, studies, texts } from '@gloss/db';
import { asc, count, eq, isNotNull, lte, and } from 'drizzle-orm';

/** Owners are reminded in the app this many days before a study's retention date. */
export const RETENTION_REMINDER_DAYS = 30;

export interface RetentionDue {
  id: string;
  title: string;
  retentionUntil: string;
  texts: number;
}

/** Studies whose retention date is at or before `now`, oldest first. */
export async function studiesPastRetention(db: Db, now = new Date()): Promise<RetentionDue[]> {
  const rows = await db
    .select({ id: studies.id, title: studies.title, retentionUntil: studies.retentionUntil, texts: count(texts.id) })
    .from(studies)
    .leftJoin(texts, eq(texts.studyId, studies.id))
    .where(and(isNotNull(studies.retentionUntil), lte(studies.retentionUntil, now)))
    .groupBy(studies.id)
    .orderBy(asc(studies.retentionUntil));
  return rows.map((r) => ({ id: r.id, title: r.title, retentionUntil: r.retentionUntil!.toISOString(), texts: Number(r.texts) }));
}

export type RetentionState = 'none' | 'ok' | 'near' | 'past';

/** Where a study stands against its retention date (the app reminds owners when `near` or `past`). */
export function retentionState(retentionUntil: Date | null, now = new Date()): RetentionState {
  if (!retentionUntil) return 'none';
  const ms = retentionUntil.getTime() - now.getTime();
  if (ms <= 0) return 'past';
  return ms <= RETENTION_REMINDER_DAYS * 86_400_000 ? 'near' : 'ok';
}
