/**
 * Child process run once for a PGlite folder that holds no database yet (pglite-first-start.ts): it runs
 * PGlite's initdb and the migrations, then exits, so their memory ends with this process instead of
 * staying in the server's. Plain JavaScript: it runs under bare `node`, without the TypeScript loader.
 * argv: data folder, migrations folder, JSON array of PGlite start parameters.
 */
import { PGlite } from '@electric-sql/pglite';
import { drizzle } from 'drizzle-orm/pglite';
import { migrate } from 'drizzle-orm/pglite/migrator';

const [dataDir, migrationsFolder, startParamsJson] = process.argv.slice(2);
if (!dataDir || !migrationsFolder || !startParamsJson) {
  process.stderr.write('usage: pglite-first-start.mjs <data folder> <migrations folder> <start parameters as JSON>\n');
  process.exit(2);
}
const client = await PGlite.create({ dataDir, startParams: JSON.parse(startParamsJson) });
try {
  await migrate(drizzle({ client }), { migrationsFolder });
} catch (err) {
  // Exit status 3 tells the parent the migrations failed, not the set-up (db_migrate_failed).
  process.stderr.write(`${err instanceof Error ? err.stack : String(err)}\n`);
  process.exitCode = 3;
} finally {
  await client.close();
}
