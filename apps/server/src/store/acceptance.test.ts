/**
 * The update store's acceptance suite (acceptance-suite.ts) against each store: the in-memory one, the
 * durable one on PGlite, and on PostgreSQL (when DATABASE_URL is set) with two pools as two nodes.
 * Holding a commit open and failing one are done for real: a table lock (PostgreSQL) or an open
 * transaction (PGlite, one connection), and a statement trigger that fails exactly one INSERT (a
 * sequence advances even when its transaction rolls back, so it fails once).
 */
import { openDatabase, sql, type Database } from '@gloss/db';
import { dbKinds, freshPgliteDir, freshPostgresDatabase } from '../../../../test/support/database.js';
import { seedDocuments } from '../../../../test/sync/support/fixtures.js';
import { updateStoreAcceptance, type StoreUnderTest } from './acceptance-suite.js';
import { createMemoryUpdateStore } from './memory-update-store.js';
import { createPgUpdateStore, type PgUpdateStore } from './pg-update-store.js';

updateStoreAcceptance('memory', async () => {
  const store = createMemoryUpdateStore();
  const docIds = Array.from({ length: 4 }, (_, i) => `00000000-0000-4000-8000-00000000000${i}`);
  return {
    store,
    docIds,
    userId: '00000000-0000-4000-8000-00000000000f',
    peer: null,
    holdCommits: async () => {
      const release = store.holdCommits();
      return async () => release();
    },
    failNextCommit: async () => store.failNextCommit(),
    close: () => store.close(),
  };
});

/** A real lock that makes the store's INSERT wait: held inside a transaction until released. */
async function holdCommits(database: Database): Promise<() => Promise<void>> {
  let release!: () => void;
  const gate = new Promise<void>((resolve) => (release = resolve));
  let started!: () => void;
  const holding = new Promise<void>((resolve) => (started = resolve));
  const done = database.db.transaction(async (tx) => {
    // PostgreSQL: EXCLUSIVE blocks INSERT (ROW EXCLUSIVE) but not SELECT, so others still read the log.
    // PGlite has one connection: the open transaction itself makes every other statement wait.
    if (database.kind === 'postgres') await tx.execute(sql`lock table updates in exclusive mode`);
    started();
    await gate;
  });
  await Promise.race([holding, done]);
  return async () => {
    release();
    await done;
  };
}

async function armFailOnce(database: Database): Promise<void> {
  await database.db.execute(sql`create sequence if not exists acceptance_fail_once start 100`);
  await database.db.execute(sql`
    create or replace function acceptance_fail_once() returns trigger language plpgsql as $$
    begin
      if nextval('acceptance_fail_once') = 1 then raise exception 'acceptance suite: this commit fails on purpose'; end if;
      return null;
    end $$`);
  await database.db.execute(sql`drop trigger if exists acceptance_fail_once on updates`);
  await database.db.execute(sql`create trigger acceptance_fail_once before insert on updates for each statement execute function acceptance_fail_once()`);
}

for (const kind of dbKinds()) {
  updateStoreAcceptance(kind, async (): Promise<StoreUnderTest> => {
    let database: Database;
    let second: Database | null = null;
    let cleanup: () => Promise<void>;
    if (kind === 'pglite') {
      const folder = await freshPgliteDir();
      database = await openDatabase({ dataDir: folder.dir });
      cleanup = async () => folder.remove();
    } else {
      const fresh = await freshPostgresDatabase();
      database = await openDatabase({ databaseUrl: fresh.url, maxConnections: 5 });
      second = await openDatabase({ databaseUrl: fresh.url, maxConnections: 5 });
      cleanup = () => fresh.drop();
    }
    const { docIds, userId } = await seedDocuments(database, 4);
    await armFailOnce(database);
    // small folds so compaction also runs by itself while the appends land
    const store: PgUpdateStore = createPgUpdateStore(database, { compactMinBytes: 512 });
    const peer: PgUpdateStore | null = second ? createPgUpdateStore(second, { compactMinBytes: 512 }) : null;
    return {
      store,
      docIds,
      userId,
      peer,
      holdCommits: () => holdCommits(database),
      failNextCommit: async () => void (await database.db.execute(sql`select setval('acceptance_fail_once', 1, false)`)),
      fold: (docId, on) => (on === 'peer' && peer ? peer : store).compact(docId),
      async close() {
        await store.close();
        await peer?.close();
        await database.close();
        await second?.close();
        await cleanup();
      },
    };
  });
}
