/**
 * Sign-in paths cost the same (issue 13): median time of POST /api/session for an unknown email, a
 * known email with a wrong password, and an imported account whose stored hash is a placeholder, on
 * an in-process server (PGlite). Each path should be one argon2id verification; the figures show it.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { users } from '@gloss/db';
import { admin, loadConfig, startServer } from '../apps/server/src/index.js';
import type { BenchRecord } from './run.js';

export async function run(): Promise<BenchRecord[]> {
  const dir = mkdtempSync(join(tmpdir(), 'gloss-bench-signin-'));
  // High limits: the bench measures cost, not the limiter.
  const server = await startServer(loadConfig({ PORT: '0', DATA_DIR: dir, LOG_LEVEL: 'error', SIGNIN_MAX_FAILURES: '100000', SIGNIN_MAX_FAILURES_PER_EMAIL: '100000', SIGNIN_MAX_FAILURES_PER_ADDRESS: '100000' }));
  try {
    await admin.createUser(server.db, { email: 'known@example.test', name: 'Known', password: 'the-right-password' });
    await server.db.insert(users).values({ email: 'imported@example.test', name: 'Imported', passwordHash: '!' });
    const attempt = async (email: string) => {
      const t = performance.now();
      const res = await fetch(`${server.url}/api/session`, { method: 'POST', headers: { 'content-type': 'application/json', origin: server.url }, body: JSON.stringify({ email, password: 'a-wrong-password' }) });
      await res.text();
      if (res.status !== 401) throw new Error(`expected 401, got ${res.status}`);
      return performance.now() - t;
    };
    const paths = { unknown_email: 'nobody@example.test', wrong_password: 'known@example.test', placeholder_hash: 'imported@example.test' };
    const times: Record<string, number[]> = { unknown_email: [], wrong_password: [], placeholder_hash: [] };
    for (let round = 0; round < 40; round++) for (const [path, email] of Object.entries(paths)) times[path]!.push(await attempt(email));
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    const record: BenchRecord = { name: 'signin_paths_median_ms', rounds: 40 };
    for (const [path, xs] of Object.entries(times)) record[path] = Number(median(xs).toFixed(1));
    return [record];
  } finally {
    await server.close();
    rmSync(dir, { recursive: true, force: true });
  }
}
