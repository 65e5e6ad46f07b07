/**
 * Backup and restore with PostgreSQL's own tools, through the scripts an operator runs
 * (infra/backup.sh: pg_dump custom format; infra/restore.sh: pg_restore in one transaction): the
 * demo study, its segments projected, is dumped, restored into a fresh empty database and compared
 * table by table, row by row (texts, segments and their quotes named explicitly). The restored
 * database then opens as Gloss opens it (migrations find nothing to do), its documents load to the
 * same state, and a new update gets a sequence number after every restored one.
 * Needs DATABASE_URL (CI sets it: then this runs, never skips).
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { documents, inArray, openDatabase, type Database } from '@gloss/db';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { seedDemo } from '../../apps/server/src/demo/seed.js';
import { loadDoc, projectDocument } from '../../apps/server/src/projection/index.js';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import { freshPostgresDatabase, type FreshPostgres } from '../support/postgres.js';

const run = promisify(execFile);
const infra = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'infra');

/** Every row of every table (public and drizzle's migration record), as JSON text, sorted. */
async function everyRow(url: string): Promise<Map<string, string[]>> {
  const sql = postgres(url, { max: 1, onnotice: () => undefined });
  try {
    const tables = await sql<{ schema: string; name: string }[]>`
      select table_schema as schema, table_name as name from information_schema.tables
      where table_type = 'BASE TABLE' and table_schema in ('public', 'drizzle') order by 1, 2`;
    const out = new Map<string, string[]>();
    for (const t of tables) {
      const rows = await sql.unsafe<{ row: string }[]>(`select to_jsonb(x)::text as row from "${t.schema}"."${t.name}" x`);
      out.set(`${t.schema}.${t.name}`, rows.map((r) => r.row).sort());
    }
    return out;
  } finally {
    await sql.end({ timeout: 5 });
  }
}

describe.runIf(Boolean(process.env.DATABASE_URL))('backup and restore with pg_dump / pg_restore', () => {
  let source: FreshPostgres;
  let target: FreshPostgres;
  let database: Database;
  let dir: string;

  beforeAll(async () => {
    source = await freshPostgresDatabase();
    target = await freshPostgresDatabase();
    dir = mkdtempSync(join(tmpdir(), 'gloss-backup-'));
    database = await openDatabase({ databaseUrl: source.url, maxConnections: 2 });
    await seedDemo(database.db);
    // Project every layer, codebook and memos document now (a server does this in the background at start).
    const store = createPgUpdateStore(database, {});
    const ids = await database.db.select({ id: documents.id }).from(documents).where(inArray(documents.kind, ['layer', 'codebook', 'memos']));
    for (const { id } of ids) await projectDocument(database.db, store, id);
    await store.close();
  }, 180_000);

  afterAll(async () => {
    await database?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
    await target?.drop();
    await source?.drop();
  });

  it('restores into a fresh database with texts, segments, quotes and documents equal', async () => {
    const file = join(dir, 'gloss.dump');
    await run('bash', [join(infra, 'backup.sh'), source.url, file]);
    await run('bash', [join(infra, 'restore.sh'), file, target.url]);

    const before = await everyRow(source.url);
    const after = await everyRow(target.url);
    expect([...after.keys()]).toEqual([...before.keys()]);
    for (const [table, rows] of before) expect(after.get(table), table).toEqual(rows);
    // The parts a study is made of, named: not vacuously equal.
    expect(before.get('public.texts')!.length).toBeGreaterThan(0);
    const quotes = (rows: string[]) => rows.map((r) => (JSON.parse(r) as { quote: string }).quote).sort();
    expect(quotes(before.get('public.segments')!).length).toBeGreaterThan(0);
    expect(quotes(after.get('public.segments')!)).toEqual(quotes(before.get('public.segments')!));
    console.log(JSON.stringify({ restored: Object.fromEntries([...after].map(([t, rows]) => [t, rows.length])) }));

    // Gloss opens the restored database as its own, and its documents load to the same state.
    const restored = await openDatabase({ databaseUrl: target.url, maxConnections: 2 });
    const fromSource = createPgUpdateStore(database, {});
    const fromRestored = createPgUpdateStore(restored, {});
    try {
      const docs = await restored.db.select({ id: documents.id }).from(documents);
      expect(docs.length).toBeGreaterThan(0);
      for (const { id } of docs) {
        const [x, y] = [await loadDoc(fromSource, id), await loadDoc(fromRestored, id)];
        expect(Buffer.from(Y.encodeStateAsUpdate(y)).equals(Buffer.from(Y.encodeStateAsUpdate(x))), id).toBe(true);
      }
      // The log's sequence came along: a new update lands after every restored row.
      const sql = postgres(target.url, { max: 1, onnotice: () => undefined });
      const [row] = await sql<{ max: string | null }[]>`select max(seq)::text as max from updates`;
      await sql.end({ timeout: 5 });
      const edit = new Y.Doc();
      edit.getMap('memos').set('after-restore', 'written to the restored database');
      const seq = await fromRestored.append(docs[0]!.id, Y.encodeStateAsUpdate(edit), null);
      expect(seq).toBeGreaterThan(Number(row?.max ?? 0));
    } finally {
      await fromSource.close();
      await fromRestored.close();
      await restored.close();
    }
  }, 180_000);
});
