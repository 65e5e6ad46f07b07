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

/** Client ids of the documents a purge replaced with `docId` (empty for a document never rebuilt). */
export async function retiredClientsOf(db: Db, docId: string): Promise<number[]> {
  const rows = await db.select({ clients: retiredDocuments.clients }).from(retiredDocuments).where(eq(retiredDocuments.replacedBy, docId));
  return rows.flatMap((r) => r.clients);
}

/** A document a de-identification purge replaced (its old room), or null. */
export async function findRetired(db: Db, docId: string) {
  if (!isUuid(docId)) return null;
  const [row] = await db.select().from(retiredDocuments).where(eq(retiredDocuments.id, docId));
  return row ?? null;
}
