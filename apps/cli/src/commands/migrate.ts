/** `gloss migrate`: opening the database runs the migrations; say which database and stop. */
import { openDatabase } from '@gloss/db';
import { loadConfig } from '@gloss/server';

export async function migrateCommand(_argv: string[]): Promise<number> {
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  await database.close();
  process.stdout.write(`Migrations applied (${database.kind === 'pglite' ? `embedded database in ${config.dataDir}` : 'PostgreSQL'}).\n`);
  return 0;
}
