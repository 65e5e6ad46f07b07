/**
 * `gloss import` and `gloss export` as people run them, in child processes on a fresh embedded
 * database: a project file into a new study, every export format (stdout and --out), `pnpm --silent
 * gloss export` giving nothing but the file on stdout, and a hostile archive refused with status 2,
 * a typed error and no row written.
 */
import { spawn } from 'node:child_process';
import { createRequire } from 'node:module';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { openDatabase, sql } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { validateAgainst } from '../../packages/interchange/src/refi/schema-check.js';
import { freshPgliteDir } from '../support/pglite-template.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const main = join(root, 'apps', 'cli', 'src', 'main.ts');
const req = createRequire(new URL('../../packages/interchange/package.json', import.meta.url));
const { unzipSync, strFromU8, zipSync, strToU8 } = req('fflate') as {
  unzipSync(b: Uint8Array): Record<string, Uint8Array>;
  strFromU8(b: Uint8Array): string;
  zipSync(f: Record<string, Uint8Array>): Uint8Array;
  strToU8(s: string): Uint8Array;
};
const Papa = req('papaparse') as { parse<T>(s: string, o: object): { data: T[]; errors: unknown[] } };

function run(cmd: string, args: string[], env: Record<string, string>): Promise<{ code: number | null; stdout: Buffer; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { cwd: root, env: { ...process.env, DATABASE_URL: '', REDIS_URL: '', ...env } });
    const out: Buffer[] = [];
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => out.push(d));
    child.stderr.on('data', (d: Buffer) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout: Buffer.concat(out), stderr }));
    child.stdin.end('a-long-enough-password\n');
  });
}
// `pnpm gloss` runs exactly `node --import tsx apps/cli/src/main.ts`
const gloss = (args: string[], env: Record<string, string>) => run(process.execPath, ['--import', 'tsx', main, ...args], env);

describe('gloss import and export', () => {
  let folder: { dir: string; remove(): void };
  let tmp: string;
  let env: Record<string, string>;
  let studyId = '';
  beforeAll(async () => {
    folder = await freshPgliteDir();
    tmp = mkdtempSync(join(tmpdir(), 'gloss-cli-'));
    env = { DATA_DIR: folder.dir };
  }, 120_000);
  afterAll(() => {
    folder?.remove();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  it('imports a .qdpx into a new study owned by the given account', async () => {
    expect((await gloss(['user', 'add', '--email', 'wren@example.org', '--name', 'Wren Okafor'], env)).code).toBe(0);
    const file = join(tmp, 'harbour.qdpx');
    writeFileSync(file, projectQdpx(projectFile(sampleStudy(), 'cli-scope')));
    const r = await gloss(['import', '--new-study', 'Harbour from a file', '--owner', 'wren@example.org', '--format', 'qdpx', file], env);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout.toString()) as { studyId: string; texts: number; segments: number; endReading: string };
    expect(report).toMatchObject({ texts: 2, segments: 6, endReading: 'exclusive' });
    expect(r.stderr).toContain('note: Only text sources are imported');
    expect(r.stderr).toContain('gloss import: 100%');
    studyId = report.studyId;
  }, 600_000);

  it('exports every format: to stdout (CSV read back) and to a file (.qdpx validated)', async () => {
    const csv = await run('pnpm', ['--silent', 'gloss', 'export', '--study', studyId, '--format', 'csv'], env);
    expect(csv.code, csv.stderr).toBe(0);
    const rows = Papa.parse<string[]>(csv.stdout.toString('utf8').replace(/^\uFEFF/, ''), { newline: '\r\n', skipEmptyLines: true });
    expect(rows.errors).toEqual([]);
    expect(rows.data.slice(1).map((x) => x[10]).sort()).toEqual(sampleStudy().segments.map((s) => s.quote).sort());
    expect(csv.stderr).toMatch(/gloss export: 100%/);

    const out = join(tmp, 'back.qdpx');
    const q = await gloss(['export', '--study', studyId, '--format', 'qdpx', '--out', out], env);
    expect(q.code, q.stderr).toBe(0);
    expect(q.stdout.length).toBe(0);
    const qde = strFromU8(unzipSync(readFileSync(out))['project.qde']!);
    expect((await validateAgainst(qde, 'project')).errors).toEqual([]);

    // the other formats run in-process in test/exchange/round-trip.test.ts; one more here for the path
    for (const format of ['codebook-md']) {
      const r = await gloss(['export', '--study', studyId, '--format', format], env);
      expect(r.code, `${format}: ${r.stderr}`).toBe(0);
      expect(r.stdout.length).toBeGreaterThan(100);
    }
    const bad = await gloss(['export', '--study', studyId, '--format', 'pdf'], env);
    expect(bad.code).toBe(2);
    // consensus layers (none in an imported study: it has no rounds) go out in the CSV only
    const consensus = await gloss(['export', '--study', studyId, '--format', 'csv', '--layers', 'consensus'], env);
    expect(consensus.code, consensus.stderr).toBe(0);
    expect(Papa.parse<string[]>(consensus.stdout.toString('utf8').replace(/^\uFEFF/, ''), { newline: '\r\n', skipEmptyLines: true }).data).toHaveLength(1); // the header
    const notThere = await gloss(['export', '--study', studyId, '--format', 'qdpx', '--layers', 'consensus'], env);
    expect(notThere.code).toBe(2);
    expect(notThere.stderr).toContain('segments CSV only');
    expect((await gloss(['export', '--study', studyId, '--format', 'csv', '--layers', 'everyone'], env)).code).toBe(2);
  }, 600_000);

  it('refuses a hostile archive with status 2 and a typed error, and writes nothing', async () => {
    const file = join(tmp, 'evil.qdpx');
    writeFileSync(file, zipSync({ 'project.qde': strToU8('<Project xmlns="urn:QDA-XML:project:1.0" name="x"/>'), '../../outside.txt': strToU8('x') }));
    const r = await gloss(['import', '--new-study', 'Evil', '--owner', 'wren@example.org', '--format', 'qdpx', file], env);
    expect(r.code).toBe(2);
    expect(JSON.parse(r.stdout.toString())).toMatchObject({ error: { code: 'unsafe_path' } });
    const database = await openDatabase({ dataDir: folder.dir });
    try {
      const rows = await database.db.execute(sql`select title from studies`);
      expect((rows as unknown as { rows: Array<{ title: string }> }).rows.map((x) => x.title)).toEqual(['Harbour from a file']);
    } finally {
      await database.close();
    }
  }, 600_000);
});
