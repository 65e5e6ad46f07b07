/** Creating accounts (CLI `gloss user add`, demo seeding, tests). */
import { type Db, users } from '@gloss/db';
import { eq } from 'drizzle-orm';
import { hashPassword, MAX_PASSWORD_LENGTH, MIN_PASSWORD_LENGTH } from '../auth/passwords.js';
import { HttpError, conflict } from '../errors.js';

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
  if (!/^[^\s@]+@[^\s@]+$/.test(email)) throw new HttpError(400, 'invalid_body', `Not an email address: "${input.email}".`);
  if (input.password.length < MIN_PASSWORD_LENGTH || input.password.length > MAX_PASSWORD_LENGTH) {
    throw new HttpError(400, 'invalid_body', `A password needs ${MIN_PASSWORD_LENGTH} to ${MAX_PASSWORD_LENGTH} characters.`);
  }
  const name = input.name.trim();
  if (!name) throw new HttpError(400, 'invalid_body', 'A name is required.');
  const passwordHash = await hashPassword(input.password);
  const [row] = await db
    .insert(users)
    .values({ email, name, passwordHash })
    .onConflictDoNothing()
    .returning({ id: users.id, email: users.email, name: users.name, createdAt: users.createdAt });
  if (!row) throw conflict(`An account with the email ${email} exists already.`);
  return row;
}

export async function findUserByEmail(db: Db, email: string) {
  const [row] = await db.select().from(users).where(eq(users.email, normaliseEmail(email)));
  return row ?? null;
}
