/**
 * Relay latency and server CPU per update, Gloss beside two references built from y-websocket 2.1.0's
 * own server utilities (bin/utils.cjs setupWSConnection): in memory, and with its own LevelDB
 * persistence switched on exactly as its YPERSISTENCE variable does (y-leveldb 0.1.2, what a team that
 * self-hosts would otherwise run; note it stores each update after relaying it, without waiting).
 * 10, 50, 100 and 200 clients each make 5 edits/s in one room; one more client only listens and times
 * each update from send to arrival. Each server runs in its own child process, which reports its own
 * process.cpuUsage(). Gloss runs as in production: the real server (startServer), a signed-in coder
 * editing their own layer of a text, durable on PGlite (and PostgreSQL when DATABASE_URL is set), every
 * update committed to the log before it is relayed. Target (issue 11): p99 and CPU per update within
 * 1.2x of the in-memory reference at every size; each record gives its ratio to both references.
 *
 * Each server starts once and serves every size, each size in a room of its own (a fresh text layer
 * for Gloss), so start-up (tens of seconds of transpiling on a loaded machine) is paid once per server.
 * Sizes run one after another; within a size the servers take turns in the order listed, and
 * BENCH_RELAY_ROUNDS (1) repeats the turns, each round in a fresh room, for A/B figures under the same
 * machine load. Windows: BENCH_RELAY_WARMUP_MS (1 s) warm-up, then BENCH_RELAY_MEASURE_MS (4 s) measured;
 * before the first size each server serves one unmeasured window of BENCH_RELAY_PREWARM_MS (8 s).
 * Each record gives the server's resident memory (RSS) at the end of its window and the 1-minute load
 * average of the machine, which is shared: CPU time per update is the steadier figure, p99 swings with load.
 * At 100 and 200 clients every server relays 50,000 and 200,000 messages a second. Above 50 clients
 * (BENCH_RELAY_CLIENTS_PER_PROCESS) the editors are spread over child processes of 50, each with its
 * own listener timing its own editors (its own clock) and reporting sent counts and latencies back;
 * 10 and 50 clients run in this process as before. The machine's cores are still shared by the server
 * and every clients process. The server's CPU time is read from /proc/<pid>/stat at the window's edges
 * (a saturated server answered its own reading late, which made its window read over 100 % CPU); the
 * socket writes still come from the server and are NaN when it does not answer within 5 s.
 * BENCH_RELAY_CLIENTS=50 and BENCH_RELAY_SERVERS=reference,gloss-pglite narrow a run (profiling).
 * Run as a child with BENCH_SERVER=gloss|reference|reference-leveldb it is the server under test instead.
 */
import { fork, spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:http';
import { createRequire } from 'node:module';
import { Socket, type AddressInfo } from 'node:net';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath, pathToFileURL } from 'node:url';
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { WebSocket, WebSocketServer } from 'ws';
import type * as YT from 'yjs';

const here = dirname(fileURLToPath(import.meta.url));
// Yjs is loaded only by the measuring parent: the reference server child loads its own (CommonJS) copy,
// and two copies in one process would trip Yjs's duplicate-import warning.
let Y: typeof YT;
const repoRoot = join(here, '..');
const EDITS_PER_SEC = 5;

/**
 * Benchmarks open up to 1,000 sockets as one person from one address, past the per-person (100) and
 * per-address (500) connection limits a real deployment keeps (sync/budgets.ts): raised here only.
 */
export const BENCH_SYNC_LIMITS = { MAX_CONNECTIONS_PER_USER: '100000', MAX_CONNECTIONS_PER_ADDRESS: '100000' } as const;
const WARMUP_MS = Number(process.env.BENCH_RELAY_WARMUP_MS ?? 1_000);
const MEASURE_MS = Number(process.env.BENCH_RELAY_MEASURE_MS ?? 4_000);
/** Rooms each server makes ready: one per size and round (BENCH_RELAY_ROOMS, set by the parent). */
const ROOM_COUNT = Number(process.env.BENCH_RELAY_ROOMS ?? 1);

export type ServerKind = 'reference' | 'reference-leveldb' | 'gloss-pglite' | 'gloss-postgres' | 'gloss-pglite-before' | 'gloss-postgres-before';

const SERVER_NAMES: Record<ServerKind, string> = {
  reference: 'y-websocket-2.1.0-utils (memory)',
  'reference-leveldb': 'y-websocket-2.1.0-utils + y-leveldb-0.1.2',
  'gloss-pglite': 'gloss-pglite',
  'gloss-postgres': 'gloss-postgres',
  'gloss-pglite-before': 'gloss-pglite (before)',
  'gloss-postgres-before': 'gloss-postgres (before)',
};

/**
 * BENCH_RELAY_BEFORE=<folder>: a checkout of an earlier commit (installed), whose Gloss server runs as
 * the "-before" kinds in the same run, for before/after figures under the same machine load.
 */
const BEFORE_ROOT = process.env.BENCH_RELAY_BEFORE;

export interface BenchServer {
  kind: ServerKind;
  /** ws://host:port/<prefix>: append the room. */
  wsBase: string;
  /** The first of `rooms`. */
  room: string;
  /** Rooms ready to use, each empty (BENCH_RELAY_ROOMS of them). */
  rooms: string[];
  headers: Record<string, string>;
  /** CPU time so far, and resident memory now in bytes (the memory bench reads it under load). */
  cpu(): Promise<{ user: number; system: number; socketWrites: number; rss: number }>;
  stop(): Promise<void>;
}

// ---------------------------------------------------------------------------------------------- child

async function serveReference(): Promise<{ port: number; rooms: string[]; wsPath: string }> {
  const require = createRequire(join(here, 'package.json'));
  const { setupWSConnection } = require('y-websocket/bin/utils') as {
    setupWSConnection: (ws: WebSocket, req: unknown, opts: { docName: string }) => void;
  };
  const http = createServer((_req, res) => res.writeHead(404).end());
  const wss = new WebSocketServer({ noServer: true });
  http.on('upgrade', (req, socket, head) => {
    wss.handleUpgrade(req, socket, head, (ws) => setupWSConnection(ws, req, { docName: (req.url ?? '/').slice(1).split('?')[0]! }));
  });
  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  return { port: (http.address() as AddressInfo).port, rooms: Array.from({ length: ROOM_COUNT }, (_, i) => `bench-room-${i}`), wsPath: '' };
}

/**
 * BENCH_GLOSS_ROOT: the checkout whose server this child runs (default this one): the "-before" kinds
 * run an earlier commit's server under this file's harness, so both sides are driven the same way.
 */
async function serveGloss(): Promise<{ port: number; rooms: string[]; wsPath: string; email: string; password: string; cleanup: () => Promise<void> }> {
  const root = process.env.BENCH_GLOSS_ROOT ?? repoRoot;
  const from = (path: string) => import(pathToFileURL(join(root, path)).href);
  const { startServer } = (await from('apps/server/src/server.ts')) as typeof import('../apps/server/src/server.js');
  const { loadConfig } = (await from('apps/server/src/config.ts')) as typeof import('../apps/server/src/config.js');
  const admin = (await from('apps/server/src/admin/index.ts')) as typeof import('../apps/server/src/admin/index.js');
  // Its own database either way: a fresh PostgreSQL database, or a copy of the migrated PGlite template.
  const { freshPgliteDir } = (await from('test/support/pglite-template.ts')) as typeof import('../test/support/pglite-template.js');
  const { freshPostgresDatabase } = (await from('test/support/postgres.ts')) as typeof import('../test/support/postgres.js');
  const pg = process.env.DATABASE_URL ? await freshPostgresDatabase() : null;
  const folder = pg ? null : await freshPgliteDir();
  const config = loadConfig({
    PORT: '0',
    HOST: '127.0.0.1',
    LOG_LEVEL: 'silent',
    DATA_DIR: folder?.dir ?? join(tmpdir(), 'unused'),
    DATABASE_URL: pg?.url ?? '',
    MAX_MESSAGE_BYTES: String(4 * 1024 * 1024),
    ...BENCH_SYNC_LIMITS,
  });
  const server = await startServer(config);
  const password = 'bench-password-1';
  const email = `bench-${Date.now()}@example.test`;
  const user = await admin.createUser(server.db, { email, name: 'Bench Coder', password });
  const study = await admin.createStudy(server.db, { title: 'Bench study', createdBy: user.id });
  // The coder's own layer of a text: a room written without a per-update write rule, as coding is.
  const rooms: string[] = [];
  for (let i = 0; i < ROOM_COUNT; i++) {
    const text = await admin.addTextFromTranscript(server.db, study.id, {
      title: `Bench text ${i + 1}`,
      sourceFormat: 'txt',
      createdBy: user.id,
      transcript: admin.transcriptFromPlainText('Interviewer: How did the week go?\n\nParticipant: Long, but we managed.'),
    });
    rooms.push(await admin.ensureLayer(server.db, study.id, text.id, user.id));
  }
  const cleanup = async () => {
    await server.close();
    folder?.remove();
    await pg?.drop();
  };
  return { port: server.port, rooms, wsPath: '/sync', email, password, cleanup };
}

/** Socket writes made by this process (one write system call each, corked or not): counted by wrapping net.Socket. */
let socketWrites = 0;
function countSocketWrites(): void {
  const proto = Socket.prototype as unknown as Record<'_write' | '_writev', (...args: unknown[]) => unknown>;
  for (const name of ['_write', '_writev'] as const) {
    const original = proto[name];
    proto[name] = function (this: unknown, ...args: unknown[]) {
      socketWrites++;
      return original.apply(this, args);
    };
  }
}

async function childMain(kind: string): Promise<void> {
  countSocketWrites();
  const { cleanup, ...info } = kind.startsWith('reference') ? { ...(await serveReference()), cleanup: async () => {} } : await serveGloss();
  process.stdout.write(JSON.stringify({ event: 'ready', ...info }) + '\n');
  // Answers "cpu" with this process's CPU time so far (microseconds).
  createInterface({ input: process.stdin }).on('line', (line) => {
    if (line === 'cpu') process.stdout.write(JSON.stringify({ event: 'cpu', ...process.cpuUsage(), socketWrites, rss: process.memoryUsage.rss() }) + '\n');
  });
  process.stdin.on('end', () => {
    cleanup().then(
      () => process.exit(0),
      (error: unknown) => {
        process.stderr.write(`bench server cleanup failed: ${String(error)}\n`);
        process.exit(1);
      },
    );
  });
}

// --------------------------------------------------------------------------------------------- parent

/** Starts a server of `kind` in a child process (tsx via --import, so the pid is the server's own). */
export async function startBenchServer(kind: ServerKind, roomCount = 1): Promise<BenchServer> {
  const env: NodeJS.ProcessEnv = { ...process.env, BENCH_SERVER: kind.startsWith('reference') ? kind : 'gloss', BENCH_RELAY_ROOMS: String(roomCount) };
  if (kind === 'gloss-pglite' || kind === 'gloss-pglite-before') delete env.DATABASE_URL;
  // y-websocket's utils switch their LevelDB persistence on when YPERSISTENCE names a folder.
  let leveldbDir: string | null = null;
  if (kind === 'reference-leveldb') env.YPERSISTENCE = leveldbDir = mkdtempSync(join(tmpdir(), 'bench-yleveldb-'));
  else delete env.YPERSISTENCE;
  // BENCH_SERVER_NODE_ARGS: extra node flags for the server only (e.g. --cpu-prof when looking into a figure).
  const nodeArgs = (process.env.BENCH_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean);
  const root = kind.endsWith('-before') ? BEFORE_ROOT! : repoRoot;
  env.BENCH_GLOSS_ROOT = root;
  const child: ChildProcess = spawn(process.execPath, [...nodeArgs, '--import', 'tsx', fileURLToPath(import.meta.url)], {
    cwd: root,
    env,
    stdio: ['pipe', 'pipe', 'inherit'],
  });
  const lines = createInterface({ input: child.stdout! });
  const waiters: Array<(msg: Record<string, unknown>) => boolean> = [];
  lines.on('line', (line) => {
    if (!line.startsWith('{')) return;
    const msg = JSON.parse(line) as Record<string, unknown>;
    const i = waiters.findIndex((w) => w(msg));
    if (i >= 0) waiters.splice(i, 1);
  });
  const next = (event: string, ms = 180_000) =>
    new Promise<Record<string, unknown>>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`bench server (${kind}): no ${event} line`)), ms);
      waiters.push((msg) => (msg.event === event ? (clearTimeout(timer), resolve(msg), true) : false));
    });
  const ready = await next('ready');
  const fromProc = procReader(child.pid);
  const http = `http://127.0.0.1:${ready.port as number}`;
  let headers: Record<string, string> = {};
  if (!kind.startsWith('reference')) {
    const res = await fetch(`${http}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: http },
      body: JSON.stringify({ email: ready.email, password: ready.password }),
    });
    const cookie = res.headers.getSetCookie().map((c) => c.split(';', 1)[0]!).find((c) => c.startsWith('gloss_session='));
    if (!cookie) throw new Error(`bench sign-in failed: ${res.status}`);
    headers = { cookie, origin: http };
  }
  return {
    kind,
    wsBase: `ws://127.0.0.1:${ready.port as number}${ready.wsPath as string}`,
    room: (ready.rooms as string[])[0]!,
    rooms: ready.rooms as string[],
    headers,
    async cpu() {
      const reply = next('cpu', fromProc === null ? 180_000 : 5_000);
      child.stdin!.write('cpu\n');
      // Read from /proc where there is one: a saturated server answers its stdin seconds late (at 200
      // clients the reference did not within 180 s), which stretched the window its CPU time covered.
      const now = fromProc?.();
      const msg: Record<string, unknown> = await reply.catch((error: unknown) => {
        if (now === undefined) throw error;
        return { socketWrites: NaN };
      });
      return now !== undefined
        ? { ...now, socketWrites: (msg.socketWrites as number | undefined) ?? NaN }
        : { user: msg.user as number, system: msg.system as number, socketWrites: (msg.socketWrites as number | undefined) ?? NaN, rss: msg.rss as number };
    },
    async stop() {
      const exited = new Promise((resolve) => child.once('exit', resolve));
      child.stdin!.end();
      // A server still swamped by a saturated window may not get to its stdin's end: not waited for past a minute.
      const kill = setTimeout(() => child.kill('SIGKILL'), 60_000);
      await exited;
      clearTimeout(kill);
      if (leveldbDir !== null) rmSync(leveldbDir, { recursive: true, force: true });
    },
  };
}

/** Clock ticks per second of /proc's CPU times (getconf CLK_TCK; 100 on Linux builds since 2.6). */
const CLOCK_TICKS = 100;

/**
 * A process's CPU time (all threads, microseconds, as process.cpuUsage() gives it) and resident memory,
 * read from /proc at the moment of the call; null where there is no /proc (the child is asked instead).
 */
function procReader(pid: number | undefined): (() => { user: number; system: number; rss: number }) | null {
  if (pid === undefined || !existsSync(`/proc/${pid}/stat`)) return null;
  return () => {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // Fields after the command name (which may hold spaces): state is the first, utime the 12th, stime the 13th.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const rssKb = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? NaN);
    return { user: (Number(fields[11]) * 1e6) / CLOCK_TICKS, system: (Number(fields[12]) * 1e6) / CLOCK_TICKS, rss: rssKb * 1024 };
  };
}

/** A bare protocol client: answers nothing, decodes only what it is asked to time. */
export function openSocket(server: BenchServer, onMessage?: (data: Uint8Array) => void, room = server.room): Promise<WebSocket> {
  const ws = new WebSocket(`${server.wsBase}/${room}`, { headers: server.headers });
  ws.binaryType = 'nodebuffer';
  if (onMessage) ws.on('message', (data: Buffer) => onMessage(new Uint8Array(data.buffer, data.byteOffset, data.byteLength)));
  return new Promise((resolve, reject) => {
    // A socket that closes (or never opens) under load must fail the run, not hang it.
    const timer = setTimeout(() => (ws.terminate(), reject(new Error('bench socket did not open in 60 s'))), 60_000);
    ws.once('open', () => (clearTimeout(timer), resolve(ws)));
    ws.once('error', (error) => (clearTimeout(timer), reject(error)));
    ws.once('close', () => (clearTimeout(timer), reject(new Error('bench socket closed before it opened'))));
  });
}

function syncMessage(step: number, payload: Uint8Array): Uint8Array {
  const e = encoding.createEncoder();
  encoding.writeVarUint(e, 0);
  encoding.writeVarUint(e, step);
  encoding.writeVarUint8Array(e, payload);
  return encoding.toUint8Array(e);
}

/** The (client, clock) ids of the structs in a sync update message, or [] for other messages. */
function updateIds(message: Uint8Array): string[] {
  const d = decoding.createDecoder(message);
  if (decoding.readVarUint(d) !== 0) return [];
  const step = decoding.readVarUint(d);
  if (step !== 2 && step !== 1) return [];
  const update = decoding.readVarUint8Array(d);
  return Y.decodeUpdate(update).structs.map((s) => `${s.id.client}:${s.id.clock}`);
}

export function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

const round = (n: number, digits = 2) => Math.round(n * 10 ** digits) / 10 ** digits;
const round2 = (n: number) => round(n);

/** Where a group of editors connects: what a clients process needs of a BenchServer. */
interface Target {
  wsBase: string;
  headers: Record<string, string>;
  room: string;
}

/**
 * Editors `from`..`from + count - 1` of `total` in `room`, and a listener that times the updates of
 * these editors only (its own process's clock): each editor sends 5 edits/s, staggered by its index
 * across the 200 ms period, from `start()`.
 */
async function editors(target: Target, from: number, count: number, total: number) {
  Y = await import('yjs');
  const server = { wsBase: target.wsBase, headers: target.headers, room: target.room } as BenchServer;
  // Send time of each update sent inside the measured window (only those are timed).
  const sentAt = new Map<string, number>();
  const latencies: number[] = [];
  let measuring = false;
  let sent = 0;
  const listener = await openSocket(server, (message) => {
    const now = performance.now();
    for (const id of updateIds(message)) {
      const t = sentAt.get(id);
      if (t !== undefined) {
        sentAt.delete(id);
        latencies.push(now - t);
      }
    }
  });
  listener.send(syncMessage(0, Y.encodeStateVector(new Y.Doc())));
  const sockets = await Promise.all(Array.from({ length: count }, () => openSocket(server)));
  const timers: Array<() => void> = [];
  const startEditing = () => sockets.forEach((ws, n) => {
    const doc = new Y.Doc();
    const text = doc.getText('text');
    let pending: Uint8Array | null = null;
    doc.on('update', (u: Uint8Array) => (pending = u));
    const edit = () => {
      const clock = Y.getState(doc.store, doc.clientID);
      text.insert(Math.floor(Math.random() * (text.length + 1)), 'a coded remark ');
      if (measuring) {
        sentAt.set(`${doc.clientID}:${clock}`, performance.now());
        sent++;
      }
      ws.send(syncMessage(2, pending!));
    };
    // Stagger the clients across the 200 ms period.
    let interval: NodeJS.Timeout | undefined;
    const start = setTimeout(() => {
      edit();
      interval = setInterval(edit, 1000 / EDITS_PER_SEC);
    }, ((from + n) * 1000) / EDITS_PER_SEC / total);
    timers.push(() => (clearTimeout(start), clearInterval(interval)));
  });
  return {
    /** Editing starts here, once every group's sockets are open (a server flooded while others connect refused them in time at 200 clients). */
    start: startEditing,
    measure(on: boolean) {
      measuring = on;
    },
    /** Stops editing, lets the last measured updates arrive (bounded), closes; the window's figures. */
    async finish(): Promise<{ sent: number; latencies: number[] }> {
      for (const stop of timers) stop();
      const deadline = Date.now() + 3_000;
      while (Date.now() < deadline && latencies.length < sent) await new Promise((resolve) => setTimeout(resolve, 20));
      for (const ws of [...sockets, listener]) ws.terminate();
      return { sent, latencies };
    },
    /** A failed window: stop at once. */
    abandon() {
      for (const stop of timers) stop();
      for (const ws of [...sockets, listener]) ws.terminate();
    },
  };
}

/**
 * Clients per process: one process cannot receive what 200 clients are sent (each editor receives
 * every other's updates: 200,000 messages a second), so above this many the editors are spread over
 * child processes (BENCH_RELAY_CLIENTS_PER_PROCESS, default 50), each with its own listener timing its
 * own editors and reporting its latencies back. At or below it everything runs in this process, as before.
 */
const CLIENTS_PER_PROCESS = Number(process.env.BENCH_RELAY_CLIENTS_PER_PROCESS ?? 50);

type Group = Awaited<ReturnType<typeof editors>>;

/** A group of editors in a child process, driven over its IPC channel. */
async function editorsInChild(target: Target, from: number, count: number, total: number): Promise<Group> {
  const env: NodeJS.ProcessEnv = { ...process.env, BENCH_RELAY_CLIENTS_CHILD: '1' };
  delete env.BENCH_SERVER;
  const child = fork(fileURLToPath(import.meta.url), [], { execArgv: ['--import', 'tsx'], cwd: repoRoot, env, stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  // A window whose server cannot keep up must fail the run, not hang it (one did at 100 clients, load average 15).
  const next = (event: string) =>
    new Promise<Record<string, unknown>>((resolve, reject) => {
      const done = () => (clearTimeout(timer), child.off('message', onMessage), child.off('exit', onExit));
      const onMessage = (msg: Record<string, unknown>) => {
        if (msg.event !== event) return;
        done();
        resolve(msg);
      };
      const onExit = (code: number | null) => (done(), reject(new Error(`bench clients process exited (${code}) before ${event}`)));
      const timer = setTimeout(() => (done(), child.kill(), reject(new Error(`bench clients process: no ${event} in 120 s`))), 120_000);
      child.on('message', onMessage);
      child.once('exit', onExit);
    });
  const opened = next('opened');
  child.send({ cmd: 'open', target, from, count, total });
  await opened;
  return {
    start() {
      child.send({ cmd: 'start' });
    },
    measure(on: boolean) {
      child.send({ cmd: on ? 'measure' : 'pause' });
    },
    async finish() {
      const result = next('result');
      child.send({ cmd: 'finish' });
      const msg = await result;
      child.disconnect();
      return { sent: msg.sent as number, latencies: msg.latencies as number[] };
    },
    abandon() {
      child.kill();
    },
  };
}

async function clientsChildMain(): Promise<void> {
  let group: Group | null = null;
  process.on('message', (msg: { cmd: string; target: Target; from: number; count: number; total: number }) => {
    void (async () => {
      if (msg.cmd === 'open') {
        group = await editors(msg.target, msg.from, msg.count, msg.total);
        process.send!({ event: 'opened' });
      } else if (msg.cmd === 'start') group!.start();
      else if (msg.cmd === 'measure') group!.measure(true);
      else if (msg.cmd === 'pause') group!.measure(false);
      else if (msg.cmd === 'finish') process.send!({ event: 'result', ...(await group!.finish()) });
    })().catch((error: unknown) => {
      process.stderr.write(`bench clients process: ${String(error)}\n`);
      process.exit(1);
    });
  });
}

/** One window: `clients` editors and a listener (one per clients process) in `room` of a running server. */
export async function measure(server: BenchServer, clients: number, room: string, measureMs = MEASURE_MS): Promise<Record<string, unknown> & { name: string }> {
  const kind = server.kind;
  const target: Target = { wsBase: server.wsBase, headers: server.headers, room };
  const processes = clients > CLIENTS_PER_PROCESS ? Math.ceil(clients / CLIENTS_PER_PROCESS) : 1;
  let groups: Group[];
  if (processes === 1) groups = [await editors(target, 0, clients, clients)];
  else {
    const opened = await Promise.allSettled(
      Array.from({ length: processes }, (_, k) => {
        const from = Math.floor((k * clients) / processes);
        return editorsInChild(target, from, Math.floor(((k + 1) * clients) / processes) - from, clients);
      }),
    );
    groups = opened.flatMap((o) => (o.status === 'fulfilled' ? [o.value] : []));
    const failed = opened.find((o) => o.status === 'rejected');
    if (failed !== undefined) {
      for (const g of groups) g.abandon();
      throw failed.reason;
    }
  }
  for (const g of groups) g.start();
  let cpu0, cpu1, results;
  try {
    await new Promise((resolve) => setTimeout(resolve, WARMUP_MS));
    cpu0 = await server.cpu();
    for (const g of groups) g.measure(true);
    await new Promise((resolve) => setTimeout(resolve, measureMs));
    for (const g of groups) g.measure(false);
    cpu1 = await server.cpu();
    results = await Promise.all(groups.map((g) => g.finish()));
  } catch (error) {
    for (const g of groups) g.abandon();
    throw error;
  }
  const sent = results.reduce((n, r) => n + r.sent, 0);
  const latencies = results.flatMap((r) => r.latencies).sort((a, b) => a - b);
  const cpuUs = cpu1.user - cpu0.user + (cpu1.system - cpu0.system);
  return {
    name: 'relay',
    server: SERVER_NAMES[kind],
    clients,
    clientProcesses: processes,
    editsPerSecPerClient: EDITS_PER_SEC,
    updatesSent: sent,
    updatesTimed: latencies.length,
    p50Ms: round(percentile(latencies, 50)),
    p99Ms: round(percentile(latencies, 99)),
    serverCpuUsPerUpdate: round(cpuUs / Math.max(1, sent), 1),
    serverCpuPercent: round((cpuUs / 1000 / measureMs) * 100, 1),
    // Load-independent: write system calls the server made per update relayed (peers + database).
    serverSocketWritesPerUpdate: round((cpu1.socketWrites - cpu0.socketWrites) / Math.max(1, sent), 1),
    serverRssMb: round(cpu1.rss / 2 ** 20, 0),
  };
}

const ALL_KINDS: ServerKind[] = ['reference', 'reference-leveldb', 'gloss-pglite-before', 'gloss-pglite', 'gloss-postgres-before', 'gloss-postgres'];
const REFERENCES: ServerKind[] = ['reference', 'reference-leveldb'];

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  const wantedKinds = process.env.BENCH_RELAY_SERVERS?.split(',').filter(Boolean);
  const kinds = ALL_KINDS.filter((k) => (wantedKinds ? wantedKinds.includes(k) : true)).filter((k) => !k.startsWith('gloss-postgres') || process.env.DATABASE_URL)
    .filter((k) => !k.endsWith('-before') || BEFORE_ROOT);
  const sizes = (process.env.BENCH_RELAY_CLIENTS ?? '10,50,100,200').split(',').map(Number);
  const rounds = Number(process.env.BENCH_RELAY_ROUNDS ?? 1);
  const records: Array<Record<string, unknown> & { name: string }> = [];
  const servers = new Map<ServerKind, BenchServer>();
  try {
    // Started side by side: start-up is not measured, and one after another it took minutes on a loaded machine.
    // One more room per server for the warm-up below.
    const started = await Promise.allSettled(kinds.map(async (kind) => servers.set(kind, await startBenchServer(kind, sizes.length * rounds + 1))));
    for (const result of started) if (result.status === 'rejected') throw result.reason;
    // A running server's code is compiled by the time anyone edits; a fresh one compiles it during the
    // first windows: three 7-second 10-client windows in a row on a fresh Gloss server read 2.7, 2.1 and
    // 1.6 ms of CPU per update, V8's helper threads (compiler, collector) 44 %, 34 % and 31 % of it
    // (per-thread /proc times, load average 7, issue 11). Each server first serves an unmeasured
    // window in a room of its own (BENCH_RELAY_PREWARM_MS, 0 skips it), so the first measured size is
    // not the one that pays for it.
    const prewarm = Number(process.env.BENCH_RELAY_PREWARM_MS ?? 8_000);
    if (prewarm > 0) {
      for (const kind of kinds) {
        const server = servers.get(kind)!;
        await measure(server, Math.min(50, Math.max(...sizes)), server.rooms[sizes.length * rounds]!, prewarm);
      }
    }
    let nextRoom = 0;
    for (const clients of sizes) {
      for (let round = 1; round <= rounds; round++) {
        const room = nextRoom++;
        const byKind = new Map<ServerKind, Record<string, unknown>>();
        // Alternate rounds take turns in reverse, so neither side of an A/B pair always goes first.
        for (const kind of round % 2 === 1 ? kinds : [...kinds].reverse()) {
          const server = servers.get(kind)!;
          const record = await measure(server, clients, server.rooms[room]!);
          byKind.set(kind, record);
          records.push({ ...record, ...(rounds > 1 ? { round } : {}), loadAverage1m: round2(loadavg()[0]!) });
          // Progress on stderr: a long curve run that fails late still shows what it measured.
          process.stderr.write(JSON.stringify(records.at(-1)) + '\n');
        }
        for (const kind of kinds.filter((k) => !REFERENCES.includes(k))) {
          const r = byKind.get(kind)!;
          for (const refKind of REFERENCES) {
            const ref = byKind.get(refKind);
            if (ref === undefined) continue;
            records.push({
              name: 'relay-vs-reference',
              server: SERVER_NAMES[kind],
              reference: SERVER_NAMES[refKind],
              clients,
              ...(rounds > 1 ? { round } : {}),
              p50Ratio: round2((r.p50Ms as number) / (ref.p50Ms as number)),
              p99Ratio: round2((r.p99Ms as number) / (ref.p99Ms as number)),
              cpuPerUpdateRatio: round2((r.serverCpuUsPerUpdate as number) / (ref.serverCpuUsPerUpdate as number)),
              rssRatio: round2((r.serverRssMb as number) / (ref.serverRssMb as number)),
              target: refKind === 'reference' ? 'p99 and CPU per update <= 1.2' : 'informative',
              loadAverage1m: round2(loadavg()[0]!),
            });
          }
        }
      }
    }
  } finally {
    for (const server of servers.values()) await server.stop();
  }
  return records;
}

if (process.env.BENCH_SERVER && process.argv[1] === fileURLToPath(import.meta.url)) {
  await childMain(process.env.BENCH_SERVER);
} else if (process.env.BENCH_RELAY_CLIENTS_CHILD && process.argv[1] === fileURLToPath(import.meta.url)) {
  await clientsChildMain();
}
