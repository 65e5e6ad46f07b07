/** Looking up a user's role in a study, and a document with its study. */
import { type Db, documents, memberships, retiredDocuments } from '@gloss/db';
import { and, eq, inArray } from 'drizzle-orm';
import type { Role } from '../sync/contracts.js';
import { isUuid } from '../ids.js';

export async function roleIn(db: Db, studyId: string, userId: string): Promise<Role | null> {
  const [row] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
  return row?.role ?? null;
}

/** The person's role in each of `studyIds` where they are a member. */
export async function rolesIn(db: Db, studyIds: readonly string[], userId: string): Promise<Map<string, Role>> {
  if (studyIds.length === 0) return new Map();
  const rows = await db
    .select({ studyId: memberships.studyId, role: memberships.role })
    .from(memberships)
    .where(and(inArray(memberships.studyId, [...studyIds]), eq(memberships.userId, userId)));
  return new Map(rows.map((r) => [r.studyId, r.role]));
}

export async function findDocument(db: Db, docId: string) {
  if (!isUuid(docId)) return null;
  const [row] = await db.select().from(documents).where(eq(documents.id, docId));
  return row ?? null;
}

/** The rows of those `docIds` that exist, by (lower-case) id; ids that are not uuids are skipped. */
export async function findDocuments(db: Db, docIds: readonly string[]) {
  const ids = docIds.filter(isUuid);
  if (ids.length === 0) return new Map<string, typeof documents.$inferSelect>();
  const rows = await db.select().from(documents).where(inArray(documents.id, ids));
  return new Map(rows.map((r) => [r.id, r]));
}

/** Those of `docIds` that a purge retired, by (lower-case) id. */
export async function findRetiredMany(db: Db, docIds: readonly string[]) {
  const ids = docIds.filter(isUuid);
  if (ids.length === 0) return new Map<string, typeof retiredDocuments.$inferSelect>();
  const rows = await db.select().from(retiredDocuments).where(inArray(retiredDocuments.id, ids));
  return new Map(rows.map((r) => [r.id, r]));
}

/** Client ids of the documents a purge replaced with each of `docIds` (only those ever rebuilt appear). */
export async function retiredClientsOfMany(db: Db, docIds: readonly string[]): Promise<Map<string, number[]>> {
  const ids = docIds.filter(isUuid);
  if (ids.length === 0) return new Map();
  const rows = await db
    .select({ replacedBy: retiredDocuments.replacedBy, clients: retiredDocuments.clients })
    .from(retiredDocuments)
    .where(inArray(retiredDocuments.replacedBy, ids));
  const out = new Map<string, number[]>();
  for (const r of rows) if (r.replacedBy) out.set(r.replacedBy, [...(out.get(r.replacedBy) ?? []), ...r.clients]);
  return out;
}
