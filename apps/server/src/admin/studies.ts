/** Studies and their members. A study is created with its owner and its codebook and memos documents. */
import { type Db, type Role, type StudyMode, documents, memberships, studies } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import { AdminError, missing } from './errors.js';
import { recordAudit } from './audit.js';

export interface NewStudy {
  title: string;
  description?: string;
  mode?: StudyMode;
  retentionUntil?: Date | null;
  ethicsNote?: string;
  createdBy: string;
}

export async function createStudy(db: Db, input: NewStudy) {
  return db.transaction(async (tx) => {
    const [study] = await tx
      .insert(studies)
      .values({
        title: input.title,
        description: input.description ?? '',
        mode: input.mode ?? 'standard',
        retentionUntil: input.retentionUntil ?? null,
        ethicsNote: input.ethicsNote ?? '',
        createdBy: input.createdBy,
      })
      .returning();
    await tx.insert(memberships).values({ studyId: study!.id, userId: input.createdBy, role: 'owner' });
    const docs = await tx
      .insert(documents)
      .values([
        { kind: 'codebook', studyId: study!.id },
        { kind: 'memos', studyId: study!.id },
      ])
      .returning({ id: documents.id, kind: documents.kind });
    await recordAudit(tx as unknown as Db, {
      userId: input.createdBy,
      studyId: study!.id,
      action: 'study.create',
      target: study!.id,
      detail: { title: input.title, mode: study!.mode },
    });
    return {
      ...study!,
      codebookRoom: docs.find((d) => d.kind === 'codebook')!.id,
      memosRoom: docs.find((d) => d.kind === 'memos')!.id,
    };
  });
}

async function ownerCount(db: Db, studyId: string): Promise<number> {
  const rows = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.studyId, studyId), eq(memberships.role, 'owner')));
  return rows.length;
}

/** Adds a member, or changes the role of an existing one. `by` is the acting user (for the log). */
export async function addMember(db: Db, studyId: string, userId: string, role: Role, by: string | null = null) {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [existing] = await t.select().from(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
    if (existing?.role === 'owner' && role !== 'owner' && (await ownerCount(t, studyId)) <= 1) {
      throw new AdminError('last_owner', 'A study keeps at least one owner.');
    }
    await t
      .insert(memberships)
      .values({ studyId, userId, role })
      .onConflictDoUpdate({ target: [memberships.studyId, memberships.userId], set: { role } });
    await recordAudit(t, {
      userId: by,
      studyId,
      action: existing ? 'member.role' : 'member.add',
      target: userId,
      detail: existing ? { from: existing.role, to: role } : { role },
    });
    return { studyId, userId, role };
  });
}

export async function removeMember(db: Db, studyId: string, userId: string, by: string | null = null) {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const [existing] = await t.select().from(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
    if (!existing) throw missing('Member');
    if (existing.role === 'owner' && (await ownerCount(t, studyId)) <= 1) {
      throw new AdminError('last_owner', 'A study keeps at least one owner.');
    }
    await t.delete(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
    await recordAudit(t, { userId: by, studyId, action: 'member.remove', target: userId, detail: { role: existing.role } });
  });
}
