/**
 * The compose topology with real processes: two Gloss nodes (one PostgreSQL database, Redis) behind a
 * real nginx running infra/nginx/gloss.conf, the file compose.yaml mounts, with only its upstream
 * addresses and port swapped for this machine's. Through the proxy: an HTTP sign-in, stock y-websocket
 * clients spread over both nodes (counted by each node's own health figures), an edit crossing nodes,
 * and, after `kill -9` of one node, its clients back through the proxy on the other.
 * Needs DATABASE_URL, REDIS_URL and nginx (.ci/run installs it): in CI this runs, never skips.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { addMemo, listMemos } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signIn } from '../support/http.js';
import { freePort } from '../support/private-services.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { remoteClient } from '../sync/support/remote.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);
// A cold start of a node on a shared 2-core machine under heavy load has taken over 60 s.
const START_MS = 180_000;
const confFile = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'infra', 'nginx', 'gloss.conf');

function nginxBinary(): string {
  for (const candidate of ['/usr/sbin/nginx', '/usr/local/sbin/nginx', '/usr/bin/nginx']) if (existsSync(candidate)) return candidate;
  throw new Error('nginx is not installed (apt-get install nginx-light; .ci/run does this)');
}

/** infra/nginx/gloss.conf inside a minimal main configuration that keeps every file in `dir`. */
export function nginxConfig(dir: string, port: number, upstreams: number[]): string {
  let site = readFileSync(confFile, 'utf8');
  const servers = [...site.matchAll(/^\s*server gloss-\d+:8080\b.*$/gm)];
  if (servers.length !== upstreams.length) throw new Error(`gloss.conf names ${servers.length} nodes, the test runs ${upstreams.length}`);
  servers.forEach((m, i) => (site = site.replace(m[0], m[0].replace(/gloss-\d+:8080/, `127.0.0.1:${upstreams[i]}`))));
  if (!/listen 8080;/.test(site)) throw new Error('gloss.conf no longer listens on 8080');
  site = site.replace('listen 8080;', `listen 127.0.0.1:${port};`);
  const user = process.getuid?.() === 0 ? 'user root root;' : '';
  return `${user}
daemon off;
worker_processes 1;
pid ${dir}/nginx.pid;
error_log ${dir}/error.log warn;
events { worker_connections 512; }
http {
  access_log ${dir}/access.log;
  client_body_temp_path ${dir}/body;
  proxy_temp_path ${dir}/proxy;
  fastcgi_temp_path ${dir}/fastcgi;
  uwsgi_temp_path ${dir}/uwsgi;
  scgi_temp_path ${dir}/scgi;
${site}
}
`;
}

describe.runIf(enabled)('two nodes behind nginx (infra/nginx/gloss.conf)', () => {
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<undefined>;
  let nginx: ChildProcess;
  let dir: string;
  let proxyUrl: string;

  beforeAll(async () => {
    const bin = nginxBinary();
    const env = { REDIS_URL: process.env.REDIS_URL!, TRUST_PROXY: '1' };
    a = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, seed: seedBasic, env });
    b = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, sameDatabaseAs: a, env });
    dir = mkdtempSync(join(tmpdir(), 'gloss-nginx-'));
    const port = await freePort();
    proxyUrl = `http://127.0.0.1:${port}`;
    writeFileSync(join(dir, 'nginx.conf'), nginxConfig(dir, port, [a.port, b.port]));
    nginx = spawn(bin, ['-p', dir, '-e', join(dir, 'error.log'), '-c', join(dir, 'nginx.conf')], { stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    nginx.stderr!.setEncoding('utf8').on('data', (c: string) => (err += c));
    await waitFor(async () => {
      if (nginx.exitCode !== null) throw new Error(`nginx exited (${nginx.exitCode}): ${err}${existsSync(join(dir, 'error.log')) ? readFileSync(join(dir, 'error.log'), 'utf8') : ''}`);
      return (await fetch(`${proxyUrl}/api/health`).catch(() => null))?.status === 200;
    }, 'nginx answering for the nodes', 30_000);
  }, 3 * START_MS);

  afterAll(async () => {
    if (nginx && nginx.exitCode === null) {
      const exited = once(nginx, 'exit');
      nginx.kill('SIGQUIT'); // graceful stop
      await exited;
    }
    if (dir) rmSync(dir, { recursive: true, force: true });
    await b?.stop();
    await a?.stop();
  });

  it('signs in over HTTP, syncs over WebSocket on both nodes, and fails over to the live node', async () => {
    const room = a.seeded.memosRoom;
    // Sign-in through the proxy: the cookie works on either node (sessions live in PostgreSQL).
    const cookie = await signIn(proxyUrl, PEOPLE.coder.email, PASSWORD);
    const me = await fetch(`${proxyUrl}/api/me`, { headers: { cookie } });
    expect(me.status).toBe(200);
    expect(JSON.stringify(await me.json())).toContain(PEOPLE.coder.email);

    const clients = Array.from({ length: 4 }, () => remoteClient(proxyUrl, cookie, room));
    try {
      await waitFor(() => clients.every((c) => c.provider.synced), 'clients synced through the proxy', 30_000);
      // Each node's own count of open sync connections (shown to a study owner): nginx spread them.
      const owner = await signIn(a.url, PEOPLE.owner.email, PASSWORD);
      const connections = async (node: SpawnedServer<unknown>) => {
        const res = await fetch(`${node.url}/api/health`, { headers: { cookie: owner } });
        return ((await res.json()) as { sync?: { connections?: number } }).sync?.connections ?? -1;
      };
      await waitFor(async () => (await connections(a)) + (await connections(b)) === 4, 'four sync connections across the nodes', 20_000);
      expect(await connections(a)).toBeGreaterThan(0);
      expect(await connections(b)).toBeGreaterThan(0);

      const author = a.seeded.users.coder.id;
      addMemo(clients[0]!.doc, { kind: 'jotting', author, title: 'through the proxy', attachedTo: { kind: 'study' } });
      addMemo(clients[1]!.doc, { kind: 'jotting', author, title: 'and back', attachedTo: { kind: 'study' } });
      const titles = (i: number) => listMemos(clients[i]!.doc).map((m) => m.title).sort();
      await waitFor(() => clients.every((_, i) => titles(i).length === 2), 'both edits on every client', 30_000);

      // kill -9 of one node: nginx sends the reconnecting clients to the other (proxy_next_upstream).
      expect(await a.kill('SIGKILL')).toBeNull();
      addMemo(clients[2]!.doc, { kind: 'jotting', author, title: 'after the failover', attachedTo: { kind: 'study' } });
      await waitFor(() => clients.every((c, i) => c.provider.wsconnected && titles(i).includes('after the failover')), 'every client back and up to date', 60_000);
      await waitFor(async () => (await connections(b)) === 4, 'all four on the surviving node', 30_000);
      for (let i = 0; i < clients.length; i++) expect(titles(i)).toEqual(['after the failover', 'and back', 'through the proxy']);
    } finally {
      for (const c of clients) c.destroy();
    }
  }, 180_000);
});
