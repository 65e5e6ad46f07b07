/**
 * `gloss serve` on a fresh embedded database seeds the invented demo before it says it is listening:
 * a script that signs in the moment it reads the listening line gets in and sees the demo study
 * (issue 13, "ready too early"). Not a timing test: the sign-in follows the line with no wait at all.
 */
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { freshPgliteDir } from '../support/pglite-template.js';
import { apiClient, signIn } from '../support/http.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const accounts = JSON.parse(readFileSync(join(root, 'demo', 'accounts.json'), 'utf8')) as Array<{ email: string; password: string; role: string }>;

describe('gloss serve', () => {
  const stops: Array<() => Promise<void> | void> = [];
  afterAll(async () => {
    for (const stop of stops.reverse()) await stop();
  });

  it('is signed-in-ready with the demo study when it prints its listening line', async () => {
    const folder = await freshPgliteDir();
    stops.push(() => folder.remove());
    const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'apps/cli/src/main.ts'), 'serve', '--port', '0'], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: '', REDIS_URL: '', DATA_DIR: folder.dir, HOST: '127.0.0.1', LOG_LEVEL: 'warn' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    stops.push(async () => {
      if (child.exitCode !== null || child.signalCode !== null) return;
      const exited = once(child, 'exit');
      child.kill('SIGTERM');
      await exited;
    });
    let stderr = '';
    child.stderr!.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    const url = await new Promise<string>((resolve, reject) => {
      child.once('exit', (code) => reject(new Error(`gloss serve exited (${code})\n${stderr}`)));
      createInterface({ input: child.stdout! }).on('line', (line) => {
        if (line.startsWith('{"event":"listening"')) resolve((JSON.parse(line) as { url: string }).url);
      });
    });
    const owner = accounts.find((a) => a.role === 'owner')!;
    const cookie = await signIn(url, owner.email, owner.password);
    const health = await apiClient(url).call<{ ok: boolean }>('GET', '/api/health');
    expect([health.status, health.body.ok]).toEqual([200, true]);
    const studies = await apiClient(url, cookie).call<Array<{ title: string }>>('GET', '/api/studies');
    expect(studies.status).toBe(200);
    expect(studies.body.length).toBeGreaterThan(0);
  }, 240_000); // demo seeding on PGlite: 30-60 s alone, minutes on a loaded 2-core machine
});
