/**
 * A PGlite folder without a database is initialised in a child process (pglite-first-start.mjs).
 * PGlite's initdb runs a second PostgreSQL instance beside the first and copies its whole 128 MB
 * WebAssembly memory; in the server's own process that garbage, and the allocator memory it leaves
 * behind, stayed resident long after start (issue 11: 745-846 MB right after the demo was seeded,
 * against 391-455 MB once collected). A process that exits gives all of it back.
 */
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DatabaseError } from './errors.js';

/** The child's exit status when initdb went well and a migration failed. */
const MIGRATIONS_FAILED = 3;
const CHILD = fileURLToPath(new URL('./pglite-first-start.mjs', import.meta.url));

/** True when `dataDir` holds no PostgreSQL cluster yet (PGlite's own test: PG_VERSION is missing). */
export function needsFirstStart(dataDir: string): boolean {
  return !existsSync(join(dataDir, 'PG_VERSION'));
}

/** Runs initdb and the migrations on `dataDir` in a child process; rejects with the child's error output. */
export function firstStartInChild(dataDir: string, migrationsFolder: string, startParams: readonly string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [CHILD, dataDir, migrationsFolder, JSON.stringify(startParams)], {
      stdio: ['ignore', 'ignore', 'pipe'],
      env: process.env,
    });
    let stderr = '';
    child.stderr!.setEncoding('utf8').on('data', (chunk: string) => {
      // The end of the output names the failure; keep at most 16 kB of it.
      stderr = (stderr + chunk).slice(-16_384);
    });
    child.once('error', (cause) => reject(new DatabaseError('db_open_failed', `cannot start the PGlite set-up process: ${String(cause)}`, { cause })));
    child.once('exit', (code, signal) => {
      if (code === 0) resolve();
      else if (code === MIGRATIONS_FAILED) reject(new DatabaseError('db_migrate_failed', `migrations failed on new PGlite data folder ${dataDir}: ${stderr.trim()}`));
      else reject(new DatabaseError('db_open_failed', `setting up PGlite data folder ${dataDir} failed (${signal ?? `exit ${code}`}): ${stderr.trim()}`));
    });
  });
}
