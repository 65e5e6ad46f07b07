/** Looking up a user's role in a study, and a document with its study. */
import { type Db, documents, memberships, retiredDocuments } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import type { Role } from '../sync/contracts.js';
import { isUuid } from '../ids.js';

export async function roleIn(db: Db, studyId: string, userId: string): Promise<Role | null> {
  const [row] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
  return row?.role ?? null;
}


export async function findDocument(db: Db, docId: string) {
  if (!isUuid(docId)) return null;
  const [row] = await db.select().from(documents).where(eq(documents.id, docId));
  return row ?? null;
}

/** A text document a de-identification purge replaced (its old room), or null. */
export async function findRetired(db: Db, docId: string) {
  if (!isUuid(docId)) return null;
  const [row] = await db.select().from(retiredDocuments).where(eq(retiredDocuments.id, docId));
  return row ?? null;
}
