/** Both adapters against one conformance suite; PostgreSQL only when DATABASE_URL is set (CI sets it). */
import { describe, expect, it } from 'vitest';
import { openTestDatabase } from '../../../test/support/database.js';
import { runConformance } from './conformance.suite.js';
import { openDatabase } from './open.js';
import { DatabaseError } from './errors.js';
import { freshPgliteDir } from '../../../test/support/pglite-template.js';
import { needsFirstStart } from './pglite-first-start.js';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

runConformance('pglite', () => openTestDatabase('pglite'));
if (process.env.DATABASE_URL) runConformance('postgres', () => openTestDatabase('postgres'));

describe('openDatabase', () => {
  it('reopens a migrated PGlite folder without migrating twice, keeping data', async () => {
    const folder = await freshPgliteDir();
    try {
      const first = await openDatabase({ dataDir: folder.dir });
      await first.db.execute("insert into audit_log (action) values ('kept')");
      await first.close();
      const second = await openDatabase({ dataDir: folder.dir });
      const rows = await second.db.execute("select action from audit_log where action = 'kept'");
      await second.close();
      expect((rows as unknown as { rows: unknown[] }).rows).toHaveLength(1);
    } finally {
      folder.remove();
    }
  });

  it('sets up a new PGlite folder (initdb and migrations in a child process) and opens it in this one', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'gloss-pglite-new-'));
    try {
      expect(needsFirstStart(dir)).toBe(true);
      const first = await openDatabase({ dataDir: join(dir, 'data') });
      try {
        expect(needsFirstStart(join(dir, 'data'))).toBe(false);
        await first.db.execute("insert into audit_log (action) values ('first')");
        const rows = await first.db.execute("select action from audit_log where action = 'first'");
        expect((rows as unknown as { rows: unknown[] }).rows).toHaveLength(1);
      } finally {
        await first.close();
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  it('fails with a typed error when the set-up child cannot set up the folder', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'gloss-pglite-bad-'));
    try {
      // A file where PostgreSQL needs its base directory: initdb cannot write the cluster.
      writeFileSync(join(dir, 'base'), 'not a directory');
      const err = await openDatabase({ dataDir: dir }).catch((x: unknown) => x);
      expect(err).toBeInstanceOf(DatabaseError);
      expect((err as DatabaseError).code).toBe('db_open_failed');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  it("runs PGlite with the memory settings chosen for it, and a caller's own settings instead when given", async () => {
    const folder = await freshPgliteDir();
    const show = async (settings?: string[]) => {
      const database = await openDatabase({ dataDir: folder.dir, ...(settings ? { pgliteSettings: settings } : {}) });
      try {
        const rows = await database.db.execute('show shared_buffers');
        return (rows as unknown as { rows: Array<{ shared_buffers: string }> }).rows[0]!.shared_buffers;
      } finally {
        await database.close();
      }
    };
    try {
      expect(await show()).toBe('16MB');
      expect(await show(['shared_buffers=32MB'])).toBe('32MB');
    } finally {
      folder.remove();
    }
  }, 120_000);

  it('fails with a typed error on an unreachable PostgreSQL', async () => {
    const err = await openDatabase({ databaseUrl: 'postgres://nobody@127.0.0.1:1/none' }).catch((x: unknown) => x);
    expect(err).toBeInstanceOf(DatabaseError);
    expect((err as DatabaseError).code).toBe('db_open_failed');
  });
});
