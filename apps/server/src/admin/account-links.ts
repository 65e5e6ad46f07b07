/**
 * Single-use, expiring links for people: an invitation to a study with a role, and a password reset.
 * The link carries a random token; only its SHA-256 is stored (as for sessions), so the table alone
 * cannot be turned into working links. Gloss sends no mail: the person who made the link copies it.
 */
import { type Db, type Role, accountLinks, studies } from '@gloss/db';
import { and, asc, eq, gt, isNull } from 'drizzle-orm';
import { generateSessionToken, looksLikeToken, sessionIdFromToken } from '../auth/tokens.js';
import { AdminError, missing } from './errors.js';
import { recordAudit } from './audit.js';
import { normaliseEmail } from './users.js';

export const INVITATION_DAYS = 7;
export const RESET_HOURS = 24;

export type LinkPurpose = 'invite' | 'reset';
export type AccountLink = typeof accountLinks.$inferSelect;

async function insertLink(db: Db, values: Omit<typeof accountLinks.$inferInsert, 'tokenHash'>) {
  const token = generateSessionToken();
  const [row] = await db.insert(accountLinks).values({ ...values, tokenHash: sessionIdFromToken(token) }).returning();
  return { token, link: row! };
}

export async function createInvitation(db: Db, input: { studyId: string; email: string; role: Role; createdBy: string; now?: Date }) {
  const email = normaliseEmail(input.email);
  if (!/^[^\s@]+@[^\s@]+$/.test(email)) throw new AdminError('invalid_input', `Not an email address: "${input.email}".`);
  const now = input.now ?? new Date();
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const made = await insertLink(t, {
      purpose: 'invite',
      email,
      studyId: input.studyId,
      role: input.role,
      createdBy: input.createdBy,
      expiresAt: new Date(now.getTime() + INVITATION_DAYS * 86_400_000),
    });
    await recordAudit(t, { userId: input.createdBy, studyId: input.studyId, action: 'member.invite', target: made.link.id, detail: { email, role: input.role } });
    return made;
  });
}

export async function createResetLink(db: Db, input: { userId: string; email: string; studyId: string; createdBy: string; now?: Date }) {
  const now = input.now ?? new Date();
  return db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const made = await insertLink(t, {
      purpose: 'reset',
      email: input.email,
      userId: input.userId,
      studyId: input.studyId,
      createdBy: input.createdBy,
      expiresAt: new Date(now.getTime() + RESET_HOURS * 3_600_000),
    });
    await recordAudit(t, { userId: input.createdBy, studyId: input.studyId, action: 'account.reset_link', target: input.userId });
    return made;
  });
}

/** The link behind a token, if it is still good: 404 unknown, 410 used or expired. */
export async function findLink(db: Db, token: string, purpose: LinkPurpose, now = new Date()): Promise<AccountLink> {
  const what = purpose === 'invite' ? 'Invitation' : 'Password reset link';
  if (!looksLikeToken(token)) throw missing(what);
  const [row] = await db.select().from(accountLinks).where(and(eq(accountLinks.tokenHash, sessionIdFromToken(token)), eq(accountLinks.purpose, purpose)));
  if (!row) throw missing(what);
  if (row.usedAt) throw new AdminError('link_used', `This ${what.toLowerCase()} has been used already; each link works once. Ask for a new one.`);
  if (row.expiresAt.getTime() <= now.getTime()) throw new AdminError('link_expired', `This ${what.toLowerCase()} expired on ${row.expiresAt.toISOString()}. Ask for a new one.`);
  return row;
}

/**
 * Marks the link used, inside the caller's transaction. The conditional update is what makes a link
 * single-use when two people (or two tabs) redeem it at once: only one update finds it unused.
 */
export async function spendLink(db: Db, link: AccountLink, now = new Date()): Promise<void> {
  const spent = await db
    .update(accountLinks)
    .set({ usedAt: now })
    .where(and(eq(accountLinks.id, link.id), isNull(accountLinks.usedAt), gt(accountLinks.expiresAt, now)))
    .returning({ id: accountLinks.id });
  if (spent.length === 0) throw new AdminError('link_used', 'This link has just been used; each link works once. Ask for a new one.');
}

/** Invitations of a study not yet used (expired ones included, marked by their date). */
export async function pendingInvitations(db: Db, studyId: string) {
  return db
    .select({ id: accountLinks.id, email: accountLinks.email, role: accountLinks.role, expiresAt: accountLinks.expiresAt, createdAt: accountLinks.createdAt })
    .from(accountLinks)
    .where(and(eq(accountLinks.studyId, studyId), eq(accountLinks.purpose, 'invite'), isNull(accountLinks.usedAt)))
    .orderBy(asc(accountLinks.createdAt));
}

export async function revokeInvitation(db: Db, studyId: string, id: string, by: string): Promise<void> {
  await db.transaction(async (tx) => {
    const t = tx as unknown as Db;
    const gone = await t
      .delete(accountLinks)
      .where(and(eq(accountLinks.id, id), eq(accountLinks.studyId, studyId), eq(accountLinks.purpose, 'invite'), isNull(accountLinks.usedAt)))
      .returning({ email: accountLinks.email });
    if (gone.length === 0) throw missing('Invitation');
    await recordAudit(t, { userId: by, studyId, action: 'member.invite_revoke', target: id, detail: { email: gone[0]!.email } });
  });
}

export async function studyTitle(db: Db, studyId: string): Promise<string> {
  const [row] = await db.select({ title: studies.title }).from(studies).where(eq(studies.id, studyId));
  return row?.title ?? '';
}
