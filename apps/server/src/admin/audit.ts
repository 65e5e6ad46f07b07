/** Appends to the access and change log (DESIGN §6, §8). */
import { auditLog, type Db } from '@gloss/db';

export interface AuditEntry {
  userId: string | null;
  studyId: string | null;
  action: string;
  target?: string | null;
  detail?: Record<string, unknown>;
}

export async function recordAudit(db: Db, entry: AuditEntry): Promise<void> {
  await recordAudits(db, [entry]);
}

/** Several entries in one insert (a page's opening request records every layer it hands out). */
export async function recordAudits(db: Db, entries: readonly AuditEntry[]): Promise<void> {
  if (entries.length === 0) return;
  await db.insert(auditLog).values(
    entries.map((entry) => ({
      userId: entry.userId,
      studyId: entry.studyId,
      action: entry.action,
      target: entry.target ?? null,
      detail: entry.detail ?? null,
    })),
  );
}
