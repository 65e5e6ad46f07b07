/** Admin operations on PGlite: the rules the API, CLI and demo seeding rely on (project brief; common practice). */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditLog, documents, eq, memberships, type Database } from '@gloss/db';
import { openTestDatabase } from '../../../../test/support/database.js';
import { AdminError } from './errors.js';
import { ADMIN_STATUS } from '../http/errors.js';
import { verifyPassword } from '../auth/passwords.js';
import { addMember, createStudy, createUser, ensureLayer, findUserByEmail, removeMember } from './index.js';

const code = async (p: Promise<unknown>) => {
  try {
    await p;
    return 'ok';
  } catch (e) {
    // Admin throws its own typed error; the answer a client sees is the HTTP edge's mapping of it.
    expect(e).toBeInstanceOf(AdminError);
    const { status, code } = ADMIN_STATUS[(e as AdminError).code];
    return `${status} ${code}`;
  }
};

describe('admin', () => {
  let database: Database;
  beforeAll(async () => {
    database = await openTestDatabase('pglite');
  });
  afterAll(() => database?.close());

  it('creates a user with a lower-cased email and an argon2id hash; refuses duplicates and weak input', async () => {
    const u = await createUser(database.db, { email: '  Ada.Quist@Example.TEST ', name: ' Ada Quist ', password: 'long-enough-pw' });
    expect(u).toMatchObject({ email: 'ada.quist@example.test', name: 'Ada Quist' });
    const row = await findUserByEmail(database.db, 'ADA.QUIST@example.test');
    expect(await verifyPassword(row!.passwordHash, 'long-enough-pw')).toBe(true);
    expect(await code(createUser(database.db, { email: 'ada.quist@EXAMPLE.test', name: 'Other', password: 'long-enough-pw' }))).toBe('409 conflict');
    expect(await code(createUser(database.db, { email: 'no-at-sign', name: 'X', password: 'long-enough-pw' }))).toBe('400 invalid_body');
    expect(await code(createUser(database.db, { email: 'x@example.test', name: 'X', password: 'short' }))).toBe('400 invalid_body');
    expect(await code(createUser(database.db, { email: 'y@example.test', name: '   ', password: 'long-enough-pw' }))).toBe('400 invalid_body');
  });

  it('creates a study with its owner, codebook and memos documents, and logs it', async () => {
    const owner = await createUser(database.db, { email: 'o1@example.test', name: 'Owner One', password: 'long-enough-pw' });
    const study = await createStudy(database.db, { title: 'Ferry workers', createdBy: owner.id });
    const docs = await database.db.select().from(documents).where(eq(documents.studyId, study.id));
    expect(docs.map((d) => d.kind).sort()).toEqual(['codebook', 'memos']);
    expect(docs.map((d) => d.id).sort()).toEqual([study.codebookRoom, study.memosRoom].sort());
    const members = await database.db.select().from(memberships).where(eq(memberships.studyId, study.id));
    expect(members).toMatchObject([{ userId: owner.id, role: 'owner' }]);
    const log = await database.db.select().from(auditLog).where(eq(auditLog.studyId, study.id));
    expect(log.map((l) => l.action)).toEqual(['study.create']);
  });

  it('keeps at least one owner, and makes one layer per coder and text', async () => {
    const owner = await createUser(database.db, { email: 'o2@example.test', name: 'Owner Two', password: 'long-enough-pw' });
    const other = await createUser(database.db, { email: 'c2@example.test', name: 'Coder Two', password: 'long-enough-pw' });
    const study = await createStudy(database.db, { title: 'Night market', createdBy: owner.id });
    expect(await code(addMember(database.db, study.id, owner.id, 'lead'))).toBe('409 last_owner');
    expect(await code(removeMember(database.db, study.id, owner.id))).toBe('409 last_owner');
    expect(await code(removeMember(database.db, study.id, other.id))).toBe('404 not_found');
    await addMember(database.db, study.id, other.id, 'owner');
    expect(await code(addMember(database.db, study.id, owner.id, 'lead'))).toBe('ok');

    const { addTextFromTranscript } = await import('./texts.js');
    const text = await addTextFromTranscript(database.db, study.id, {
      title: 'Stall 4',
      transcript: { turns: [{ speaker: 'P01', startMs: null, endMs: null, text: 'We open at dusk.' }] },
      sourceFormat: 'txt',
      createdBy: owner.id,
    });
    expect(text.wordCount).toBe(4);
    const [l1, l2] = await Promise.all([ensureLayer(database.db, study.id, text.id, other.id), ensureLayer(database.db, study.id, text.id, other.id)]);
    expect(l1).toBe(l2);
    expect(await ensureLayer(database.db, study.id, text.id, owner.id)).not.toBe(l1);
  });
});
