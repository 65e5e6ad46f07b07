/**
 * The `gloss` command as people run it: `tsx apps/cli/src/main.ts …` in a child process (the root
 * script `pnpm gloss` runs exactly this), on a fresh embedded database.
 */
import { spawn } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freshPgliteDir } from '../support/pglite-template.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const tsx = join(root, 'node_modules', '.bin', 'tsx');
const main = join(root, 'apps', 'cli', 'src', 'main.ts');

function gloss(args: string[], env: Record<string, string> = {}, stdin = ''): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(tsx, [main, ...args], { cwd: root, env: { ...process.env, DATABASE_URL: '', REDIS_URL: '', ...env } });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d));
    child.stderr.on('data', (d: Buffer) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
    child.stdin.end(stdin);
  });
}

describe('gloss command line', () => {
  let folder: { dir: string; remove(): void };
  beforeAll(async () => {
    folder = await freshPgliteDir();
  }, 120_000);
  afterAll(() => folder?.remove());

  it('lists its commands with --help and refuses an unknown one with status 2', async () => {
    const help = await gloss(['--help']);
    expect(help.code).toBe(0);
    for (const name of ['serve', 'demo', 'migrate', 'user add', 'agreement']) expect(help.stdout).toContain(`gloss ${name}`);
    const unknown = await gloss(['frobnicate']);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain('unknown command');
  }, 60_000);

  it('migrates, adds a user (password from stdin), refuses a duplicate, and loads the demo once', async () => {
    const env = { DATA_DIR: folder.dir };
    expect((await gloss(['migrate'], env)).code).toBe(0);

    const added = await gloss(['user', 'add', '--email', 'Ines@Example.org', '--name', 'Ines Varga'], env, 'a-long-enough-password\n');
    expect(added.code, added.stderr).toBe(0);
    expect(JSON.parse(added.stdout)).toMatchObject({ email: 'ines@example.org', name: 'Ines Varga' });

    const dup = await gloss(['user', 'add', '--email', 'ines@example.org', '--name', 'Again', '--password', 'another-long-password'], env);
    expect(dup.code).toBe(2);
    expect(dup.stderr).toMatch(/exists already/);

    const demo = await gloss(['demo'], env);
    expect(demo.code, demo.stderr).toBe(0);
    expect(demo.stdout).toContain('Loaded the invented demo study');
    expect(demo.stdout).toContain('coder1@example.org');

    const again = await gloss(['demo'], env);
    expect(again.code).toBe(0);
    expect(again.stdout).toContain('nothing loaded');
  }, 180_000);
});
