/** The study's pseudonym key: read by the owner only, exported once, deletable (DESIGN §8). */
import { pseudonymKeyExports, pseudonyms, type Db } from '@gloss/db';
import { asc, eq } from 'drizzle-orm';
import { recordAudit } from '../admin/audit.js';
import { conflict } from '../errors.js';

export async function readKey(db: Db, studyId: string) {
  const entries = await db
    .select({ kind: pseudonyms.kind, original: pseudonyms.original, pseudonym: pseudonyms.pseudonym, createdAt: pseudonyms.createdAt })
    .from(pseudonyms)
    .where(eq(pseudonyms.studyId, studyId))
    .orderBy(asc(pseudonyms.pseudonym), asc(pseudonyms.original));
  const [exported] = await db.select().from(pseudonymKeyExports).where(eq(pseudonymKeyExports.studyId, studyId));
  return { entries, exportedAt: exported?.exportedAt ?? null };
}

/** Originals of the key (for finding, consistency and the scan; never sent to anyone but the owner). */
export async function keyMap(db: Db, studyId: string): Promise<Map<string, string>> {
  const rows = await db.select({ original: pseudonyms.original, pseudonym: pseudonyms.pseudonym }).from(pseudonyms).where(eq(pseudonyms.studyId, studyId));
  return new Map(rows.map((r) => [r.original, r.pseudonym]));
}

const csvCell = (v: string) => (/[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);

/** The key as CSV (RFC 4180), once: a second export is refused so copies do not multiply. */
export async function exportKeyOnce(db: Db, studyId: string, by: string): Promise<string> {
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const inserted = await t.insert(pseudonymKeyExports).values({ studyId, exportedBy: by }).onConflictDoNothing().returning();
    if (inserted.length === 0) throw conflict('The pseudonym key of this study was exported already; it can be exported once.');
    const { entries } = await readKey(t, studyId);
    await recordAudit(t, { userId: by, studyId, action: 'deid.key.export', target: studyId, detail: { entries: entries.length } });
    const lines = [['pseudonym', 'original', 'kind'], ...entries.map((e) => [e.pseudonym, e.original, e.kind])];
    return `${lines.map((l) => l.map(csvCell).join(',')).join('\r\n')}\r\n`;
  });
}

export async function deleteKey(db: Db, studyId: string, by: string): Promise<number> {
  const gone = await db.delete(pseudonyms).where(eq(pseudonyms.studyId, studyId)).returning({ id: pseudonyms.id });
  await recordAudit(db, { userId: by, studyId, action: 'deid.key.delete', target: studyId, detail: { entries: gone.length } });
  return gone.length;
}
