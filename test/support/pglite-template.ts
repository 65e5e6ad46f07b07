/**
 * Fresh PGlite data folders for tests, fast: initialising a folder takes seconds, copying a migrated
 * template takes a fraction. The template is built once per migration set and PGlite build (keyed
 * by a hash of the migration files and PGlite's resolved path) and shared by every worker and run;
 * it is built in a private folder and renamed into place, so concurrent workers never see a
 * half-built one.
 */
import { createHash, randomBytes } from 'node:crypto';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { migrationsFolder, openDatabase } from '@gloss/db';

function migrationsHash(): string {
  const hash = createHash('sha256');
  const walk = (dir: string) => {
    for (const name of readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const path = join(dir, name.name);
      if (name.isDirectory()) walk(path);
      else hash.update(name.name).update(readFileSync(path));
    }
  };
  walk(migrationsFolder);
  // A data folder belongs to one PGlite build: its resolved path carries the version (pnpm store path).
  hash.update(createRequire(join(migrationsFolder, '..', 'package.json')).resolve('@electric-sql/pglite'));
  return hash.digest('hex').slice(0, 16);
}

let templatePromise: Promise<string> | undefined;

/** Path of the migrated template folder (built on first use). */
export function pgliteTemplate(): Promise<string> {
  templatePromise ??= (async () => {
    const template = join(tmpdir(), `gloss-pglite-template-${migrationsHash()}`);
    if (existsSync(join(template, 'PG_VERSION'))) return template;
    const building = `${template}.building-${process.pid}-${randomBytes(4).toString('hex')}`;
    const database = await openDatabase({ dataDir: building });
    await database.close();
    try {
      renameSync(building, template);
    } catch (err) {
      // Another worker won the race: use theirs.
      rmSync(building, { recursive: true, force: true });
      if (!existsSync(join(template, 'PG_VERSION'))) throw err;
    }
    return template;
  })();
  return templatePromise;
}

/** A new, migrated, empty PGlite data folder; remove() deletes it. */
export async function freshPgliteDir(): Promise<{ dir: string; remove(): void }> {
  const template = await pgliteTemplate();
  const dir = mkdtempSync(join(tmpdir(), 'gloss-pglite-'));
  cpSync(template, dir, { recursive: true });
  return { dir, remove: () => rmSync(dir, { recursive: true, force: true }) };
}
