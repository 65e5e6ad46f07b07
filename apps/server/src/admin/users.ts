/** Creating accounts (CLI `gloss user add`, demo seeding, tests). */
import { type Db, sessions, users } from '@gloss/db';
import { and, eq, ne } from 'drizzle-orm';
import { hashPassword, MAX_PASSWORD_LENGTH, MIN_PASSWORD_LENGTH } from '../auth/passwords.js';
import { AdminError } from './errors.js';

export interface NewUser {
  email: string;
  name: string;
  password: string;
}

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

export async function createUser(db: Db, input: NewUser) {
  const email = normaliseEmail(input.email);
  if (!/^[^\s@]+@[^\s@]+$/.test(email)) throw new AdminError('invalid_input', `Not an email address: "${input.email}".`);
  checkPassword(input.password);
  const name = input.name.trim();
  if (!name) throw new AdminError('invalid_input', 'A name is required.');
  const passwordHash = await hashPassword(input.password);
  const [row] = await db
    .insert(users)
    .values({ email, name, passwordHash })
    .onConflictDoNothing()
    .returning({ id: users.id, email: users.email, name: users.name, createdAt: users.createdAt });
  if (!row) throw new AdminError('conflict', `An account with the email ${email} exists already.`);
  return row;
}

export async function findUserByEmail(db: Db, email: string) {
  const [row] = await db.select().from(users).where(eq(users.email, normaliseEmail(email)));
  return row ?? null;
}

function checkPassword(password: string): void {
  if (password.length < MIN_PASSWORD_LENGTH || password.length > MAX_PASSWORD_LENGTH) {
    throw new AdminError('invalid_input', `A password needs ${MIN_PASSWORD_LENGTH} to ${MAX_PASSWORD_LENGTH} characters.`);
  }
}

/**
 * Sets a new password and ends the account's sessions, all of them or all but `keepSessionId` (the one
 * that asked). The caller tells live access, so open connections of the ended sessions close.
 */
export async function setPassword(db: Db, userId: string, password: string, keepSessionId?: string): Promise<void> {
  checkPassword(password);
  const passwordHash = await hashPassword(password);
  await db.transaction(async (tx) => {
    await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
    await tx.delete(sessions).where(keepSessionId ? and(eq(sessions.userId, userId), ne(sessions.id, keepSessionId)) : eq(sessions.userId, userId));
  });
}
