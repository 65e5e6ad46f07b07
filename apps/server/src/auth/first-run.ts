/**
 * First run: on a database with no account yet, the first visitor may create the owner account, but
 * only with the one-time set-up code this process printed in its terminal (so nobody else on the
 * network can claim a fresh server first). Each process has its own code; whichever is used first
 * wins, and once any account exists no code works again.
 */
import { createHash, randomInt, timingSafeEqual } from 'node:crypto';
import { type Db, sql, users } from '@gloss/db';
import { createUser } from '../admin/users.js';
import { recordAudit } from '../admin/audit.js';
import { HttpError } from '../errors.js';

/** Letters and digits that cannot be mistaken for one another when read off a terminal. */
const ALPHABET = 'ABCDEFGHJKMNPQRSTUVWXYZ23456789';

export function generateSetupCode(): string {
  const chars = Array.from({ length: 12 }, () => ALPHABET[randomInt(ALPHABET.length)]!);
  return `${chars.slice(0, 4).join('')}-${chars.slice(4, 8).join('')}-${chars.slice(8).join('')}`;
}

/** What a person might type for a code: case, spaces and dashes do not matter. */
export function normaliseSetupCode(code: string): string {
  return code.toUpperCase().replace(/[\s-]/g, '');
}

const digest = (code: string) => createHash('sha256').update(normaliseSetupCode(code)).digest();

export interface FirstRun {
  /** This process's code (printed at start when the database has no account). */
  readonly code: string;
  /** True while the database holds no account. */
  open(): Promise<boolean>;
  /** Creates the first account if `code` is right and the database is still empty; returns it. */
  claim(code: string, owner: { email: string; name: string; password: string }): Promise<{ id: string; email: string; name: string }>;
}

export function createFirstRun(db: Db, code: string = generateSetupCode()): FirstRun {
  const expected = digest(code);
  const hasAccount = async (d: Db) => (await d.select({ id: users.id }).from(users).limit(1)).length > 0;
  return {
    code,
    async open() {
      return !(await hasAccount(db));
    },
    async claim(given, owner) {
      if (!timingSafeEqual(digest(given), expected)) {
        throw new HttpError(403, 'bad_setup_code', 'That set-up code is not the one printed in the server’s terminal.');
      }
      return db.transaction(async (tx) => {
        const t = tx as unknown as Db;
        // Serialises two claims on PostgreSQL (several nodes, each with its own code); PGlite has one connection anyway.
        await t.execute(sql`select pg_advisory_xact_lock(hashtext('gloss:first-run'))`);
        if (await hasAccount(t)) throw new HttpError(409, 'already_set_up', 'This server is set up already: sign in, or ask an owner for an invitation.');
        const user = await createUser(t, owner);
        await recordAudit(t, { userId: user.id, studyId: null, action: 'server.setup', target: user.id });
        return { id: user.id, email: user.email, name: user.name };
      });
    },
  };
}
