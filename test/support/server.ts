/**
 * A real server process for integration tests: `node --import tsx apps/server/src/main.ts` on PORT=0,
 * ready once it prints its `{"event":"listening"}` line (no sleeps). Not the `tsx` command: it relays
 * signals to a child of its own and, when the child does not acknowledge within 30 ms (common on a
 * busy machine), sends the signal again and then SIGKILLs it and exits 143 — a graceful close looked
 * like a crash. Each spawn gets its own database: a copy of
 * the migrated PGlite template, or a fresh PostgreSQL database from DATABASE_URL. PGlite is
 * single-process, so seeding happens before the server starts (and again between stop and restart).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { dirname, join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { openDatabase, type Db } from '@gloss/db';
import { freshPgliteDir } from './pglite-template.js';
import { freshPostgresDatabase, type DbKindUnderTest } from './postgres.js';

export { dbKinds } from './postgres.js';

const repoRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const mainTs = join(repoRoot, 'apps', 'server', 'src', 'main.ts');

export interface SpawnOptions<T> {
  db: DbKindUnderTest;
  env?: Record<string, string>;
  /** Runs against the database before the server starts; its result is `seeded`. */
  seed?: (db: Db) => Promise<T>;
  /**
   * Another node on the same database (PostgreSQL only): reuses `sameDatabaseAs`'s database, which
   * stays owned by the first server (stop() of this one leaves it in place).
   */
  sameDatabaseAs?: SpawnedServer<unknown>;
  /**
   * A PostgreSQL database made elsewhere (a private cluster in a fault test): used as it is and left
   * in place by stop().
   */
  databaseUrl?: string;
  /** How long to wait for the listening line (default 60 s: a cold tsx start on a busy 2-core box). */
  startTimeoutMs?: number;
}

export interface SpawnedServer<T> {
  readonly url: string;
  readonly port: number;
  readonly seeded: T;
  readonly dbKind: DbKindUnderTest;
  /** The database variables the process runs with (DATA_DIR or DATABASE_URL). */
  readonly dbEnv: Readonly<Record<string, string>>;
  /** Output so far (for failure messages). */
  readonly stderr: string;
  /** The running process's id (its memory is read from /proc by the fuzz run); undefined while stopped. */
  readonly pid: number | undefined;
  /** Sends a signal and waits for the exit; returns the exit code (null when killed by the signal). */
  kill(signal?: NodeJS.Signals): Promise<number | null>;
  /** Stops the process (SIGTERM, graceful) and deletes its database. */
  stop(): Promise<void>;
  /** Stops the process if running, optionally runs more seeding, and starts it again on the same database. */
  restart(seed?: (db: Db) => Promise<unknown>): Promise<void>;
  /** Runs fn against the database while the server is stopped (PGlite) or beside it (PostgreSQL). */
  withDb<R>(fn: (db: Db) => Promise<R>): Promise<R>;
}

export async function spawnServer<T = undefined>(options: SpawnOptions<T>): Promise<SpawnedServer<T>> {
  let env: Record<string, string>;
  let cleanup: () => Promise<void>;
  if (options.sameDatabaseAs) {
    if (options.db !== 'postgres') throw new Error('spawnServer: only PostgreSQL can be shared by several nodes');
    env = { ...options.sameDatabaseAs.dbEnv };
    cleanup = async () => undefined;
  } else if (options.databaseUrl) {
    if (options.db !== 'postgres') throw new Error('spawnServer: databaseUrl needs db: postgres');
    env = { DATABASE_URL: options.databaseUrl };
    cleanup = async () => undefined;
  } else if (options.db === 'pglite') {
    const folder = await freshPgliteDir();
    env = { DATA_DIR: folder.dir };
    cleanup = async () => folder.remove();
  } else {
    const fresh = await freshPostgresDatabase();
    env = { DATABASE_URL: fresh.url };
    cleanup = () => fresh.drop();
  }
  const openDb = () => openDatabase(env.DATABASE_URL ? { databaseUrl: env.DATABASE_URL, maxConnections: 2 } : { dataDir: env.DATA_DIR! });
  const withDb = async <R>(fn: (db: Db) => Promise<R>): Promise<R> => {
    const database = await openDb();
    try {
      return await fn(database.db);
    } finally {
      await database.close();
    }
  };

  let seeded = undefined as T;
  try {
    if (options.seed) seeded = await withDb(options.seed);
  } catch (err) {
    await cleanup();
    throw err;
  }

  let child: ChildProcess | null = null;
  let url = '';
  let port = 0;
  let stderr = '';

  async function start(): Promise<void> {
    stderr = '';
    // `--import tsx` resolves from cwd (the repo root); one process, so signals reach main.ts directly.
    const proc = spawn(process.execPath, ['--import', 'tsx', mainTs], {
      cwd: repoRoot,
      env: {
        ...process.env,
        PORT: '0',
        HOST: '127.0.0.1',
        LOG_LEVEL: 'warn',
        REDIS_URL: '',
        DATABASE_URL: '',
        ...env,
        ...options.env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child = proc;
    proc.stderr!.setEncoding('utf8').on('data', (chunk: string) => {
      stderr += chunk;
    });
    const lines = createInterface({ input: proc.stdout! });
    const timeoutMs = options.startTimeoutMs ?? 60_000;
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => {
        proc.kill('SIGKILL');
        reject(new Error(`server did not print its listening line within ${timeoutMs} ms\n${stderr}`));
      }, timeoutMs);
      const onExit = (code: number | null) => {
        clearTimeout(timer);
        child = null;
        reject(new Error(`server exited (${code}) before listening\n${stderr}`));
      };
      proc.once('exit', onExit);
      lines.on('line', (line) => {
        if (!line.startsWith('{')) return;
        try {
          const event = JSON.parse(line) as { event?: string; url?: string; port?: number };
          if (event.event !== 'listening') return;
          url = event.url!;
          port = event.port!;
          clearTimeout(timer);
          proc.off('exit', onExit);
          resolve();
        } catch {
          // not our line
        }
      });
    });
  }

  async function kill(signal: NodeJS.Signals = 'SIGTERM'): Promise<number | null> {
    const proc = child;
    if (!proc || proc.exitCode !== null || proc.signalCode !== null) return proc?.exitCode ?? null;
    const exited = once(proc, 'exit') as Promise<[number | null, NodeJS.Signals | null]>;
    proc.kill(signal);
    const [code] = await exited;
    child = null;
    return code;
  }

  try {
    await start();
  } catch (err) {
    await cleanup();
    throw err;
  }

  return {
    get url() {
      return url;
    },
    get port() {
      return port;
    },
    get stderr() {
      return stderr;
    },
    get pid() {
      return (child as ChildProcess | null)?.pid;
    },
    seeded,
    dbKind: options.db,
    dbEnv: env,
    kill,
    async stop() {
      await kill('SIGTERM');
      await cleanup();
    },
    async restart(seed) {
      await kill('SIGTERM');
      if (seed) await withDb(seed);
      await start();
    },
    async withDb(fn) {
      if (options.db === 'pglite' && child && child.exitCode === null && child.signalCode === null) throw new Error('withDb on PGlite needs the server stopped (single process)');
      return withDb(fn);
    },
  };
}
