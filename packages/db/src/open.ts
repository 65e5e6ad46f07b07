/**
 * Driver choice: embedded PGlite in a data folder by default, PostgreSQL (postgres.js) when a URL is
 * given. Both get the same drizzle schema and the same migrations, run here at open.
 */
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { PGlite } from '@electric-sql/pglite';
import { sql } from 'drizzle-orm';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzlePostgres } from 'drizzle-orm/postgres-js';
import { migrate as migratePostgres } from 'drizzle-orm/postgres-js/migrator';
import postgres from 'postgres';
import { DatabaseError } from './errors.js';
import { firstStartInChild, needsFirstStart } from './pglite-first-start.js';
import * as schema from './schema.js';

export type Schema = typeof schema;
/** The drizzle database type both drivers satisfy. */
export type Db = PgDatabase<PgQueryResultHKT, Schema>;
export type DbKind = 'pglite' | 'postgres';

export interface OpenOptions {
  /** postgres://… → PostgreSQL. Wins over dataDir. */
  databaseUrl?: string;
  /** PGlite data folder (created if missing). Neither given → PGlite in memory. */
  dataDir?: string;
  /** Connection pool size for PostgreSQL (default 10). */
  maxConnections?: number;
  /** PGlite server settings (`name=value`), replacing PGLITE_MEMORY_SETTINGS. */
  pgliteSettings?: readonly string[];
}

/**
 * PGlite keeps PostgreSQL's memory defaults (shared_buffers 128 MB among them), all inside the one
 * WebAssembly memory of this process, which never shrinks. Measured on the demo right after start
 * (issue 11): resident 491 MB with the defaults, 381 MB with these; `relaxedDurability` (532 MB),
 * glibc's MALLOC_ARENA_MAX=2 (513 MB), lazy WebAssembly compilation (488 MB) and shared_buffers 8 MB
 * (386 MB) gave nothing more. A study's working set is far smaller than 16 MB of pages, and the
 * operating system caches the files. Later (issue 11, /proc/<pid>/smaps at rest): of the 128 MB
 * WebAssembly memory only ~31 MB is resident; most of the rest was a new folder's initdb (garbage of a
 * second PostgreSQL instance, and allocator memory it left behind), now run in a child process
 * (pglite-first-start.ts): demo at rest after a fresh start 391-455 MB -> 270-345 MB over four runs
 * (the spread is glibc keeping freed memory: malloc_trim through gdb gave back 30-90 MB each time).
 */
export const PGLITE_MEMORY_SETTINGS: readonly string[] = ['shared_buffers=16MB', 'work_mem=1MB', 'maintenance_work_mem=8MB', 'temp_buffers=1MB'];

export interface Database {
  db: Db;
  kind: DbKind;
  /**
   * Runs fn in one transaction that holds a transaction-level advisory lock on `key`, so only one
   * node at a time runs it (compaction). With `{ wait: false }` returns `{ acquired: false }` at once
   * when another holder has it.
   */
  withAdvisoryLock<T>(key: string, fn: (tx: Db) => Promise<T>): Promise<T>;
  tryAdvisoryLock<T>(key: string, fn: (tx: Db) => Promise<T>): Promise<{ acquired: true; value: T } | { acquired: false }>;
  close(): Promise<void>;
}

/** The migrations folder, found relative to this file so it works from any working directory. */
export const migrationsFolder = join(dirname(fileURLToPath(import.meta.url)), '..', 'migrations');

/** Key → bigint for pg_advisory_*; hashtextextended exists in PostgreSQL ≥ 11 and in PGlite. */
const lockId = (key: string) => sql`hashtextextended(${key}, 0)`;
const MIGRATION_LOCK = 'gloss:migrate';

export async function openDatabase(options: OpenOptions = {}): Promise<Database> {
  return options.databaseUrl
    ? openPostgres(options.databaseUrl, options.maxConnections ?? 10)
    : openPglite(options.dataDir, options.pgliteSettings ?? PGLITE_MEMORY_SETTINGS);
}

async function openPglite(dataDir: string | undefined, settings: readonly string[]): Promise<Database> {
  let client: PGlite;
  const startParams = [...PGlite.defaultStartParams, ...settings.flatMap((s) => ['-c', s])];
  try {
    if (dataDir) mkdirSync(dataDir, { recursive: true });
  } catch (cause) {
    throw new DatabaseError('db_open_failed', `cannot create PGlite data folder ${dataDir}: ${String(cause)}`, { cause });
  }
  // A new folder's initdb and first migrations run in a child process (pglite-first-start.ts).
  if (dataDir && needsFirstStart(dataDir)) await firstStartInChild(dataDir, migrationsFolder, startParams);
  try {
    client = await PGlite.create({ ...(dataDir ? { dataDir } : {}), startParams });
  } catch (cause) {
    throw new DatabaseError('db_open_failed', `cannot open PGlite data folder ${dataDir ?? '(memory)'}: ${String(cause)}`, { cause });
  }
  const db = drizzlePglite({ client, schema }) as unknown as Db;
  try {
    await migratePglite(db as never, { migrationsFolder });
  } catch (cause) {
    await client.close().catch(() => undefined);
    throw new DatabaseError('db_migrate_failed', `migrations failed on PGlite: ${String(cause)}`, { cause });
  }
  return makeDatabase(db, 'pglite', () => client.close());
}

async function openPostgres(url: string, max: number): Promise<Database> {
  // Notices ("schema already exists, skipping") are noise at every start.
  const client = postgres(url, { max, onnotice: () => undefined });
  const db = drizzlePostgres({ client, schema }) as unknown as Db;
  try {
    // Several nodes may start at once: a session-level lock on a reserved connection serialises migrations.
    const reserved = await client.reserve();
    try {
      await reserved`select pg_advisory_lock(hashtextextended(${MIGRATION_LOCK}, 0))`;
      await migratePostgres(db as never, { migrationsFolder });
    } finally {
      await reserved`select pg_advisory_unlock(hashtextextended(${MIGRATION_LOCK}, 0))`.catch(() => undefined);
      reserved.release();
    }
  } catch (cause) {
    await client.end({ timeout: 5 }).catch(() => undefined);
    const code = isConnectionError(cause) ? 'db_open_failed' : 'db_migrate_failed';
    throw new DatabaseError(code, `PostgreSQL ${code === 'db_open_failed' ? 'connection' : 'migrations'} failed: ${String(cause)}`, { cause });
  }
  return makeDatabase(db, 'postgres', () => client.end({ timeout: 5 }));
}

function isConnectionError(err: unknown): boolean {
  const code = (err as { code?: unknown })?.code;
  return typeof code === 'string' && (code.startsWith('E') || code === '3D000' || code === '28000' || code === '28P01');
}

function makeDatabase(db: Db, kind: DbKind, closeClient: () => Promise<unknown>): Database {
  let closing: Promise<void> | undefined;
  return {
    db,
    kind,
    withAdvisoryLock(key, fn) {
      return db.transaction(async (tx) => {
        await tx.execute(sql`select pg_advisory_xact_lock(${lockId(key)})`);
        return fn(tx as unknown as Db);
      });
    },
    tryAdvisoryLock(key, fn) {
      return db.transaction(async (tx) => {
        const rows = await tx.execute<{ ok: boolean }>(sql`select pg_try_advisory_xact_lock(${lockId(key)}) as ok`);
        const ok = rowsOf<{ ok: boolean }>(rows)[0]?.ok === true;
        if (!ok) return { acquired: false as const };
        return { acquired: true as const, value: await fn(tx as unknown as Db) };
      });
    },
    close() {
      closing ??= closeClient().then(() => undefined);
      return closing;
    },
  };
}

/** `db.execute` returns an array (postgres.js) or `{ rows }` (PGlite): give rows either way. */
export function rowsOf<T>(result: unknown): T[] {
  if (Array.isArray(result)) return result as T[];
  const rows = (result as { rows?: unknown })?.rows;
  return Array.isArray(rows) ? (rows as T[]) : [];
}
