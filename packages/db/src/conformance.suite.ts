/**
 * The behaviour both drivers must share, as one suite run once per adapter (the pattern of
 * automerge-repo's storage-adapter tests). Expected behaviours are PostgreSQL's documented semantics
 * (PostgreSQL 15 manual: unique/partial indexes §11.8, CHECK constraints §5.4.1, bytea §8.4,
 * advisory locks §9.27.10, ON DELETE CASCADE §5.4.5).
 */
import { and, asc, eq, gt, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Database } from './open.js';
import { auditLog, documents, memberships, snapshots, studies, texts, updates, users } from './schema.js';

export function runConformance(name: string, open: () => Promise<Database>): void {
  describe(`database conformance: ${name}`, () => {
    let database: Database;
    beforeAll(async () => {
      database = await open();
    });
    afterAll(async () => {
      await database?.close();
    });

    let counter = 0;
    const email = () => `person${++counter}-${Math.random().toString(36).slice(2)}@example.test`;
    async function makeUser() {
      const [u] = await database.db.insert(users).values({ email: email(), name: 'Ama Test', passwordHash: 'h' }).returning();
      return u!;
    }
    async function makeStudy() {
      const u = await makeUser();
      const [s] = await database.db.insert(studies).values({ title: 'Harbour lives', createdBy: u.id }).returning();
      const [t] = await database.db.insert(texts).values({ studyId: s!.id, title: 'Interview 1', sourceFormat: 'txt' }).returning();
      return { user: u, study: s!, text: t! };
    }
    const pgCode = (err: unknown): unknown => {
      let e = err as { code?: unknown; cause?: unknown } | undefined;
      for (let i = 0; e && i < 5; i++) {
        if (typeof e.code === 'string' && /^[0-9A-Z]{5}$/.test(e.code)) return e.code;
        e = e.cause as typeof e;
      }
      return undefined;
    };

    it('reports its kind', () => {
      expect(['pglite', 'postgres']).toContain(database.kind);
      expect(database.kind).toBe(name);
    });

    it('defaults ids (uuid v4 from gen_random_uuid) and timestamps', async () => {
      const u = await makeUser();
      expect(u.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
      expect(u.createdAt).toBeInstanceOf(Date);
    });

    it('refuses a duplicate email with unique_violation 23505', async () => {
      const e = email();
      await database.db.insert(users).values({ email: e, name: 'A', passwordHash: 'h' });
      const err = await database.db.insert(users).values({ email: e, name: 'B', passwordHash: 'h' }).catch((x: unknown) => x);
      expect(pgCode(err)).toBe('23505');
    });

    it('refuses an email that is not lower-cased (check_violation 23514)', async () => {
      const err = await database.db.insert(users).values({ email: 'Upper@Example.test', name: 'A', passwordHash: 'h' }).catch((x: unknown) => x);
      expect(pgCode(err)).toBe('23514');
    });

    it('round-trips bytea as a plain Uint8Array, all 256 byte values and empty', async () => {
      const { study, text } = await makeStudy();
      const [doc] = await database.db.insert(documents).values({ kind: 'text', studyId: study.id, textId: text.id }).returning();
      const all = Uint8Array.from({ length: 512 }, (_, i) => i % 256);
      await database.db.insert(updates).values([
        { docId: doc!.id, data: all, bytes: all.byteLength },
        { docId: doc!.id, data: new Uint8Array(0), bytes: 0 },
      ]);
      const rows = await database.db.select().from(updates).where(eq(updates.docId, doc!.id)).orderBy(asc(updates.seq));
      expect(rows).toHaveLength(2);
      expect(rows[0]!.data.constructor).toBe(Uint8Array);
      expect(Array.from(rows[0]!.data)).toEqual(Array.from(all));
      expect(rows[1]!.data.byteLength).toBe(0);
      expect(typeof rows[0]!.seq).toBe('number');
      expect(rows[1]!.seq).toBeGreaterThan(rows[0]!.seq);
    });

    it('hands out increasing seq numbers and reads them back in order after a given seq', async () => {
      const { study, text } = await makeStudy();
      const [doc] = await database.db.insert(documents).values({ kind: 'text', studyId: study.id, textId: text.id }).returning();
      const inserted = await database.db
        .insert(updates)
        .values(Array.from({ length: 20 }, (_, i) => ({ docId: doc!.id, data: Uint8Array.of(i), bytes: 1 })))
        .returning({ seq: updates.seq });
      const seqs = inserted.map((r) => r.seq);
      expect([...seqs].sort((a, b) => a - b)).toEqual(seqs);
      const after = await database.db
        .select({ seq: updates.seq, data: updates.data })
        .from(updates)
        .where(and(eq(updates.docId, doc!.id), gt(updates.seq, seqs[9]!)))
        .orderBy(asc(updates.seq));
      expect(after.map((r) => r.data[0])).toEqual([10, 11, 12, 13, 14, 15, 16, 17, 18, 19]);
    });

    it('upserts a snapshot with a bigint seq', async () => {
      const { study, text } = await makeStudy();
      const [doc] = await database.db.insert(documents).values({ kind: 'text', studyId: study.id, textId: text.id }).returning();
      const big = 2 ** 40; // beyond int4, within JS safe integers
      await database.db.insert(snapshots).values({ docId: doc!.id, seq: 5, data: Uint8Array.of(1), bytes: 1 });
      await database.db
        .insert(snapshots)
        .values({ docId: doc!.id, seq: big, data: Uint8Array.of(2, 3), bytes: 2 })
        .onConflictDoUpdate({ target: snapshots.docId, set: { seq: big, data: Uint8Array.of(2, 3), bytes: 2, updatedAt: sql`now()` } });
      const [snap] = await database.db.select().from(snapshots).where(eq(snapshots.docId, doc!.id));
      expect(snap!.seq).toBe(big);
      expect(Array.from(snap!.data)).toEqual([2, 3]);
    });

    it('allows one layer per (text, coder) and one codebook and memos document per study', async () => {
      const { study, text, user } = await makeStudy();
      await database.db.insert(documents).values({ kind: 'layer', studyId: study.id, textId: text.id, coderId: user.id });
      const dupLayer = await database.db
        .insert(documents)
        .values({ kind: 'layer', studyId: study.id, textId: text.id, coderId: user.id })
        .catch((x: unknown) => x);
      expect(pgCode(dupLayer)).toBe('23505');
      await database.db.insert(documents).values([
        { kind: 'codebook', studyId: study.id },
        { kind: 'memos', studyId: study.id },
      ]);
      const dupCodebook = await database.db.insert(documents).values({ kind: 'codebook', studyId: study.id }).catch((x: unknown) => x);
      expect(pgCode(dupCodebook)).toBe('23505');
      // A second coder's layer on the same text is fine.
      const other = await makeUser();
      await database.db.insert(documents).values({ kind: 'layer', studyId: study.id, textId: text.id, coderId: other.id });
    });

    it('refuses a document whose shape does not fit its kind, and an unknown kind or role', async () => {
      const { study, text } = await makeStudy();
      const layerWithoutCoder = await database.db.insert(documents).values({ kind: 'layer', studyId: study.id, textId: text.id }).catch((x: unknown) => x);
      expect(pgCode(layerWithoutCoder)).toBe('23514');
      const badKind = await database.db.insert(documents).values({ kind: 'poster' as never, studyId: study.id }).catch((x: unknown) => x);
      expect(pgCode(badKind)).toBe('23514');
      const u = await makeUser();
      const badRole = await database.db.insert(memberships).values({ studyId: study.id, userId: u.id, role: 'boss' as never }).catch((x: unknown) => x);
      expect(pgCode(badRole)).toBe('23514');
    });

    it('deleting a study cascades to its texts, documents and updates', async () => {
      const { study, text } = await makeStudy();
      const [doc] = await database.db.insert(documents).values({ kind: 'text', studyId: study.id, textId: text.id }).returning();
      await database.db.insert(updates).values({ docId: doc!.id, data: Uint8Array.of(9), bytes: 1 });
      await database.db.delete(studies).where(eq(studies.id, study.id));
      expect(await database.db.select().from(texts).where(eq(texts.studyId, study.id))).toEqual([]);
      expect(await database.db.select().from(updates).where(eq(updates.docId, doc!.id))).toEqual([]);
    });

    it('keeps jsonb audit detail as structured data', async () => {
      const detail = { role: 'coder', nested: { n: 1, list: ['a', 'ü'] } };
      const [row] = await database.db.insert(auditLog).values({ action: 'member.add', detail }).returning();
      const [back] = await database.db.select().from(auditLog).where(eq(auditLog.id, row!.id));
      expect(back!.detail).toEqual(detail);
    });

    it('rolls back a failed transaction', async () => {
      const e = email();
      const err = await database.db
        .transaction(async (tx) => {
          await tx.insert(users).values({ email: e, name: 'Gone', passwordHash: 'h' });
          throw new Error('stop');
        })
        .catch((x: unknown) => x);
      expect((err as Error).message).toBe('stop');
      expect(await database.db.select().from(users).where(eq(users.email, e))).toEqual([]);
    });

    it('runs work under an advisory lock and returns its value', async () => {
      const u = await makeUser();
      const got = await database.withAdvisoryLock('conformance', async (tx) => (await tx.select().from(users).where(eq(users.id, u.id))).length);
      expect(got).toBe(1);
      const tried = await database.tryAdvisoryLock('conformance', async () => 'ran');
      expect(tried).toEqual({ acquired: true, value: 'ran' });
    });

    it.runIf(name === 'postgres')('tryAdvisoryLock reports not acquired while another session holds the key', async () => {
      const result = await database.withAdvisoryLock('held-key', async () => database.tryAdvisoryLock('held-key', async () => 'ran'));
      expect(result).toEqual({ acquired: false });
    });
  });
}
