/**
 * `gloss retention` as an administrator's cron job runs it: a child process on a database holding one
 * study past its retention date and one not yet. Expected behaviour from the project brief (issue 12
 * item 7: list studies past their date; delete them only when asked, with a confirmation flag for
 * scripts); exit status 2 for a refused invocation is common practice for command-line tools.
 */
import { spawn } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase, studies, texts, eq, type Database } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addTextFromTranscript, createStudy, createUser, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { freshPgliteDir, freshPostgresDatabase } from '../support/database.js';
import { dbKinds } from '../support/server.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const tsx = join(root, 'node_modules', '.bin', 'tsx');
const main = join(root, 'apps', 'cli', 'src', 'main.ts');

function gloss(args: string[], env: Record<string, string>): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(tsx, [main, ...args], { cwd: root, env: { ...process.env, DATABASE_URL: '', REDIS_URL: '', ...env } });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d));
    child.stderr.on('data', (d: Buffer) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
    child.stdin.end();
  });
}

describe.each(dbKinds())('gloss retention on %s', (kind) => {
  let env: Record<string, string>;
  let cleanup: () => Promise<void>;
  let past: string;
  let future: string;
  const DAY = 86_400_000;

  /** PGlite is single-process: the test's connection is open only between CLI runs. */
  async function withDb<T>(fn: (db: Database['db']) => Promise<T>): Promise<T> {
    const database = await openDatabase(kind === 'pglite' ? { dataDir: env.DATA_DIR! } : { databaseUrl: env.DATABASE_URL! });
    try {
      return await fn(database.db);
    } finally {
      await database.close();
    }
  }

  beforeAll(async () => {
    if (kind === 'pglite') {
      const folder = await freshPgliteDir();
      env = { DATA_DIR: folder.dir };
      cleanup = async () => folder.remove();
    } else {
      const fresh = await freshPostgresDatabase();
      env = { DATABASE_URL: fresh.url };
      cleanup = () => fresh.drop();
    }
    ({ past, future } = await withDb(async (db) => {
      const owner = await createUser(db, { email: 'aila.owner@example.test', name: 'Aila Brennock', password: 'owner-password-1' });
      const a = await createStudy(db, { title: 'Ferry workers 2019', createdBy: owner.id, retentionUntil: new Date(Date.now() - DAY) });
      const b = await createStudy(db, { title: 'Ferry workers 2031', createdBy: owner.id, retentionUntil: new Date(Date.now() + 40 * DAY) });
      await addTextFromTranscript(db, a.id, { title: 'Deckhand 1', transcript: transcriptFromPlainText('P1: Night crossings were the worst.'), sourceFormat: 'txt', createdBy: owner.id });
      return { past: a.id, future: b.id };
    }));
  }, 240_000);
  afterAll(async () => cleanup?.());

  it('lists only the study past its date and deletes nothing', async () => {
    const res = await gloss(['retention'], env);
    expect(res.code, res.stderr).toBe(0);
    const out = JSON.parse(res.stdout) as { past: { id: string; title: string; texts: number }[]; deleted: string[] };
    expect(out.past.map((s) => [s.id, s.title, s.texts])).toEqual([[past, 'Ferry workers 2019', 1]]);
    expect(out.deleted).toEqual([]);
    expect(await withDb(async (db) => (await db.select().from(studies)).length)).toBe(2);
  }, 120_000);

  it('--delete without --yes and without a terminal refuses with status 2', async () => {
    const res = await gloss(['retention', '--delete'], env);
    expect(res.code).toBe(2);
    expect(res.stderr).toContain('--yes');
    expect(await withDb(async (db) => (await db.select().from(studies).where(eq(studies.id, past))).length)).toBe(1);
  }, 120_000);

  it('--delete --yes deletes the study past its date with its texts, and keeps the other', async () => {
    const res = await gloss(['retention', '--delete', '--yes'], env);
    expect(res.code, res.stderr).toBe(0);
    expect((JSON.parse(res.stdout) as { deleted: string[] }).deleted).toEqual([past]);
    const left = await withDb(async (db) => ({
      studies: (await db.select({ id: studies.id }).from(studies)).map((s) => s.id),
      texts: (await db.select().from(texts).where(eq(texts.studyId, past))).length,
    }));
    expect(left).toEqual({ studies: [future], texts: 0 });
    // A second run finds nothing left to do.
    const again = await gloss(['retention', '--delete', '--yes'], env);
    expect(JSON.parse(again.stdout)).toEqual({ past: [], deleted: [] });
  }, 120_000);
});
