/**
 * Private Redis and PostgreSQL processes for fault tests, so a test can stop and restart them
 * without touching the shared services on 6379 and 5432 that other suites use at the same time.
 * Each listens on loopback on a free port and keeps its files in a temporary folder.
 *
 * PostgreSQL refuses to run as root, and CI runs as root: then initdb and pg_ctl run as the
 * `postgres` account through `runuser` (util-linux), which owns the folder.
 */
import { execFile, spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { chmodSync, chownSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { waitFor } from './wait.js';

const run = promisify(execFile);

/** A port nothing listens on now (the OS picks it; released before it is used). */
export async function freePort(): Promise<number> {
  const server = createServer();
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  const { port } = server.address() as { port: number };
  server.close();
  await once(server, 'close');
  return port;
}

export interface PrivateRedis {
  readonly url: string;
  readonly port: number;
  /** Kills the process (SIGKILL: nothing is saved; Redis keeps no state for Gloss anyway). */
  kill(): Promise<void>;
  /** Starts it again on the same port and waits until it answers PING. */
  start(): Promise<void>;
  /** Runs redis-cli against it and returns the output. */
  cli(...args: string[]): Promise<string>;
  stop(): Promise<void>;
}

export async function startPrivateRedis(): Promise<PrivateRedis> {
  const port = await freePort();
  let proc: ChildProcess | null = null;
  const cli = async (...args: string[]) => (await run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), ...args])).stdout.trim();
  const start = async () => {
    proc = spawn('redis-server', ['--bind', '127.0.0.1', '--port', String(port), '--save', '', '--appendonly', 'no'], { stdio: 'ignore' });
    const exited = proc;
    await waitFor(async () => {
      if (exited.exitCode !== null) throw new Error(`redis-server exited (${exited.exitCode}) on port ${port}`);
      return (await cli('ping').catch(() => '')) === 'PONG';
    }, `private redis on ${port}`, 20_000);
  };
  const kill = async () => {
    const p = proc;
    proc = null;
    if (!p || p.exitCode !== null || p.signalCode !== null) return;
    const exited = once(p, 'exit');
    p.kill('SIGKILL');
    await exited;
  };
  await start();
  return { url: `redis://127.0.0.1:${port}`, port, kill, start, cli, stop: kill };
}

export interface PrivatePostgres {
  /** Admin URL (database `postgres`, user `postgres`, trust on loopback). */
  readonly url: string;
  readonly port: number;
  /** A URL for database `name` on this cluster. */
  urlFor(name: string): string;
  /** `pg_ctl stop -m fast`: open connections are ended, as in a restart by an administrator. */
  stop(): Promise<void>;
  start(): Promise<void>;
  /** Stops it and deletes its folder. */
  remove(): Promise<void>;
}

function postgresBin(): string {
  const root = '/usr/lib/postgresql';
  const versions = existsSync(root) ? readdirSync(root).filter((v) => existsSync(join(root, v, 'bin', 'pg_ctl'))).sort((a, b) => Number(a) - Number(b)) : [];
  const newest = versions.at(-1);
  if (!newest) throw new Error(`no PostgreSQL server binaries under ${root}`);
  return join(root, newest, 'bin');
}

export async function startPrivatePostgres(): Promise<PrivatePostgres> {
  const bin = postgresBin();
  const port = await freePort();
  const dir = mkdtempSync(join(tmpdir(), 'gloss-pg-'));
  const data = join(dir, 'data');
  const asRoot = process.getuid?.() === 0;
  if (asRoot) {
    const { stdout } = await run('id', ['-u', 'postgres']);
    const { stdout: gid } = await run('id', ['-g', 'postgres']);
    chownSync(dir, Number(stdout.trim()), Number(gid.trim()));
    chmodSync(dir, 0o700);
  }
  const pg = (tool: string, args: string[]) => (asRoot ? run('runuser', ['-u', 'postgres', '--', join(bin, tool), ...args]) : run(join(bin, tool), args));
  await pg('initdb', ['-D', data, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--no-sync']);
  // Unix socket in our own folder: the default /var/run/postgresql may belong to the shared cluster.
  const options = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c max_connections=60`;
  const start = async () => {
    await pg('pg_ctl', ['start', '-w', '-t', '60', '-D', data, '-l', join(dir, 'log'), '-o', options]);
  };
  const stop = async () => {
    await pg('pg_ctl', ['stop', '-w', '-t', '60', '-m', 'fast', '-D', data]);
  };
  await start();
  const urlFor = (name: string) => `postgres://postgres@127.0.0.1:${port}/${name}`;
  return {
    url: urlFor('postgres'),
    port,
    urlFor,
    start,
    stop,
    async remove() {
      await stop().catch(() => undefined); // already stopped is fine
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
