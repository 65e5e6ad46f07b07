/**
 * Server memory (issue 11 items 3 and 6, issue 13): resident memory of `gloss serve` as `pnpm start`
 * runs it (a child process, VmRSS from /proc), at rest and with documents loaded.
 * - `memory.rest.pglite-demo`: a fresh embedded database seeded with the demo, nobody connected, once
 *   the demo is seeded and the projection has caught up (target <= 300 MB; 887 MB in issue 11, 391-455 MB
 *   before a new folder's initdb moved to a child process, packages/db/src/pglite-first-start.ts);
 *   `hwmMb` is the peak since start;
 * - `memory.rest.pglite-empty` and `memory.rest.postgres` (when DATABASE_URL is set): no demo;
 * - `memory.loaded-documents.pglite`: 1,000 small texts (one 200-word turn each), one WebSocket per
 *   text's room opened until the room answered (loaded), RSS sampled at 0, 10, 100 and 1,000 rooms:
 *   memory per loaded document is the growth from 0 to 1,000 divided by 1,000.
 * - `memory.load.pglite` and `memory.load.postgres` (when DATABASE_URL is set): the relay bench's load
 *   (50 clients x 5 edits/s on one text, its server) and the server's RSS at the end of the measured window.
 * No outside reference is run here (bench/relay.bench.ts runs the y-websocket server for relay).
 * BENCH_MEMORY_DOCUMENTS (default 1000) makes the loaded-documents part smaller for a quick check;
 * BENCH_MEMORY_PARTS (demo, loaded-documents, postgres, load; default all) picks parts.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync, mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase } from '@gloss/db';
import { admin } from '@gloss/server';
import { freshPostgresDatabase } from '../test/support/postgres.js';
import WebSocket from 'ws';
import { BENCH_SYNC_LIMITS, measure, startBenchServer } from './relay.bench.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const mb = (kb: number) => Math.round(kb / 1024);
const load1 = () => Math.round(loadavg()[0]! * 100) / 100;

function status(pid: number): { rssMb: number; hwmMb: number } {
  const s = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (k: string) => Number(new RegExp(`${k}:\\s+(\\d+)`).exec(s)?.[1] ?? 0);
  return { rssMb: mb(kb('VmRSS')), hwmMb: mb(kb('VmHWM')) };
}

interface Child {
  proc: ChildProcess;
  url: string;
  stop(): Promise<void>;
}

/** `gloss serve` on a port of its own choosing (PORT=0), ready once it prints its listening line. */
async function serve(env: Record<string, string>, args: string[] = []): Promise<Child> {
  // The embedded database unless this server is given one: a DATABASE_URL inherited from the bench's own
  // environment would put the "PGlite" servers on PostgreSQL (their figures, and the sign-in, were wrong).
  const inherited: NodeJS.ProcessEnv = { ...process.env };
  if (!('DATABASE_URL' in env)) delete inherited.DATABASE_URL;
  delete inherited.REDIS_URL;
  const proc = spawn(process.execPath, ['--import', 'tsx', join(root, 'apps/cli/src/main.ts'), 'serve', ...args], {
    cwd: root,
    env: { ...inherited, PORT: '0', HOST: '127.0.0.1', LOG_LEVEL: 'warn', ...BENCH_SYNC_LIMITS, ...env },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error('server not listening in 10 minutes')), 600_000);
    let buffer = '';
    proc.stdout!.on('data', (chunk: Buffer) => {
      buffer += chunk.toString('utf8');
      for (const line of buffer.split('\n')) {
        if (!line.startsWith('{')) continue;
        try {
          const event = JSON.parse(line) as { event?: string; url?: string };
          if (event.event === 'listening' && event.url) {
            clearTimeout(timer);
            resolve(event.url.replace('localhost', '127.0.0.1'));
          }
        } catch {
          // a partial line: wait for the rest
        }
      }
    });
    proc.once('exit', (code) => reject(new Error(`server exited (${code}) before listening`)));
  });
  proc.stdout!.resume();
  return {
    proc,
    url,
    stop: () =>
      new Promise<void>((resolve) => {
        proc.once('exit', () => resolve());
        proc.kill('SIGTERM');
      }),
  };
}

/** RSS once the projection catch-up and start-up garbage have settled (the figure a person would see a little after start). */
async function atRest(child: Child) {
  const samples: number[] = [];
  for (let i = 0; i < 6; i++) {
    await new Promise((r) => setTimeout(r, 5_000));
    samples.push(status(child.proc.pid!).rssMb);
  }
  return { rssMb: samples.at(-1)!, samplesMb: samples, hwmMb: status(child.proc.pid!).hwmMb };
}

export async function run() {
  const out: Array<Record<string, unknown> & { name: string }> = [];
  const parts = process.env.BENCH_MEMORY_PARTS?.split(',').filter(Boolean);
  for (const [name, part] of [['memory.demo', demoAtRest], ['memory.loaded-documents', loadedDocuments], ['memory.postgres', postgresAtRest], ['memory.load', underLoad]] as const) {
    if (parts && !parts.includes(name.replace('memory.', ''))) continue;
    // One part failing (a busy machine, no PostgreSQL) keeps the others' figures.
    await part(out).catch((err: unknown) => out.push({ name, error: String((err as Error)?.stack ?? err) }));
  }
  return out;
}

type Out = Array<Record<string, unknown> & { name: string }>;

async function demoAtRest(out: Out) {
  {
    const dir = mkdtempSync(join(tmpdir(), 'gloss-bench-mem-'));
    const child = await serve({ DATA_DIR: dir });
    try {
      out.push({
        name: 'memory.rest.pglite-demo',
        ...(await atRest(child)),
        targetMb: 300,
        before: [
          { rssMb: 887, note: 'issue 11, measured after pnpm start on a fresh clone' },
          { rssMb: 414, rangeMb: [391, 455], note: 'initdb in the server process; 745-846 MB while its garbage was not yet collected' },
        ],
        loadavg1: load1(),
      });
    } finally {
      await child.stop();
      rmSync(dir, { recursive: true, force: true });
    }
  }
}

const DOCUMENTS = Number(process.env.BENCH_MEMORY_DOCUMENTS ?? 1_000);

async function loadedDocuments(out: Out) {
  // 1,000 small texts written before the server starts (PGlite is one process's at a time).
  const dir = mkdtempSync(join(tmpdir(), 'gloss-bench-mem-'));
  const rooms: string[] = [];
  {
    const database = await openDatabase({ dataDir: dir });
    try {
      const owner = await admin.createUser(database.db, { email: 'bench.mem@example.test', name: 'Bench Owner', password: 'bench-password-1' });
      const study = await admin.createStudy(database.db, { title: 'Memory', createdBy: owner.id });
      const words = 'we carried the nets down to the harbour before the school bus came and the ferry was late again '.repeat(10);
      for (let i = 0; i < DOCUMENTS; i++) {
        const text = await admin.addTextFromTranscript(database.db, study.id, {
          title: `Note ${i}`,
          transcript: { turns: [{ speaker: 'P01', startMs: null, endMs: null, text: `${i} ${words}` }] },
          sourceFormat: 'txt',
          createdBy: owner.id,
        });
        rooms.push(text.room);
      }
    } finally {
      await database.close();
    }
  }
  const child = await serve({ DATA_DIR: dir }, ['--no-demo']);
  const sockets: WebSocket[] = [];
  try {
    const rest = await atRest(child);
    out.push({ name: 'memory.rest.pglite-empty', ...rest, documents: DOCUMENTS, loadavg1: load1() });
    const res = await fetch(`${child.url}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: child.url },
      body: JSON.stringify({ email: 'bench.mem@example.test', password: 'bench-password-1' }),
    });
    const set = res.headers.getSetCookie()[0];
    if (res.status !== 200 || !set) throw new Error(`sign-in answered ${res.status}: ${await res.text()}`);
    const cookie = set.split(';', 1)[0]!;
    const open = (room: string) =>
      new Promise<void>((resolve, reject) => {
        const ws = new WebSocket(`${child.url.replace('http', 'ws')}/sync/${room}`, { headers: { cookie, origin: child.url } });
        sockets.push(ws);
        ws.once('message', () => resolve()); // the server greets once the room has loaded
        ws.once('error', reject);
        ws.once('close', (code) => reject(new Error(`closed ${code}`)));
      });
    const points: Array<{ rooms: number; rssMb: number }> = [{ rooms: 0, rssMb: rest.rssMb }];
    let opened = 0;
    for (const target of [10, 100, 1_000].filter((n) => n < DOCUMENTS).concat(DOCUMENTS)) {
      while (opened < target) {
        const batch = rooms.slice(opened, Math.min(target, opened + 20));
        await Promise.all(batch.map(open));
        opened += batch.length;
      }
      await new Promise((r) => setTimeout(r, 3_000));
      points.push({ rooms: opened, rssMb: status(child.proc.pid!).rssMb });
    }
    const last = points.at(-1)!;
    out.push({
      name: 'memory.loaded-documents.pglite',
      documentChars: 1_000,
      points,
      perDocumentKb: Math.round(((last.rssMb - rest.rssMb) * 1024) / last.rooms),
      for1000Mb: last.rssMb - rest.rssMb,
      loadavg1: load1(),
    });
  } finally {
    for (const ws of sockets) ws.terminate();
    await child.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

async function postgresAtRest(out: Out) {
  if (process.env.DATABASE_URL) {
    const fresh = await freshPostgresDatabase();
    try {
      const pg = await serve({ DATABASE_URL: fresh.url });
      try {
        out.push({ name: 'memory.rest.postgres', ...(await atRest(pg)), note: 'empty database (PostgreSQL is never seeded with the demo); the database server is another process', loadavg1: load1() });
      } finally {
        await pg.stop();
      }
    } finally {
      await fresh.drop();
    }
  }
}

const LOAD_CLIENTS = 50;

async function underLoad(out: Out) {
  for (const kind of ['gloss-pglite', 'gloss-postgres'] as const) {
    if (kind === 'gloss-postgres' && !process.env.DATABASE_URL) continue;
    const server = await startBenchServer(kind);
    let relay;
    try {
      relay = await measure(server, LOAD_CLIENTS, server.room);
    } finally {
      await server.stop();
    }
    out.push({
      name: `memory.load.${kind.replace('gloss-', '')}`,
      rssMb: relay.serverRssMb,
      clients: LOAD_CLIENTS,
      editsPerSecPerClient: relay.editsPerSecPerClient,
      updatesSent: relay.updatesSent,
      before: kind === 'gloss-pglite' ? { rssMb: [530, 570], note: 'issue 11, 50 clients, gloss as pnpm start runs it' } : null,
      loadavg1: load1(),
    });
  }
}
