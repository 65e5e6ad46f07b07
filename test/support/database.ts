/** Open a fresh, migrated database of either kind for a test; close() also deletes it. */
import { openDatabase, type Database } from '@gloss/db';
import { freshPgliteDir } from './pglite-template.js';
import { freshPostgresDatabase, type DbKindUnderTest } from './postgres.js';

export { dbKinds, freshPostgresDatabase } from './postgres.js';
export { freshPgliteDir, pgliteTemplate } from './pglite-template.js';

export async function openTestDatabase(kind: DbKindUnderTest): Promise<Database> {
  if (kind === 'pglite') {
    const folder = await freshPgliteDir();
    const database = await openDatabase({ dataDir: folder.dir });
    return { ...database, close: async () => { await database.close(); folder.remove(); } };
  }
  const fresh = await freshPostgresDatabase();
  const database = await openDatabase({ databaseUrl: fresh.url, maxConnections: 5 });
  return { ...database, close: async () => { await database.close(); await fresh.drop(); } };
}
