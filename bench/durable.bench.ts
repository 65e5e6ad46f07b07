/**
 * Durable updates per second on one node: the update store's group commit (updates arriving while a
 * commit is in flight go into the next multi-row INSERT) beside one commit per update (maxBatch 1),
 * on PGlite and, when DATABASE_URL is set, PostgreSQL. Load: 1,000 appends kept in flight across 100
 * documents, 40-byte Yjs updates (a few typed words each). Target (DESIGN.md §9): >= 20,000/s on PostgreSQL.
 */
import * as Y from 'yjs';
import { openDatabase, type Database } from '@gloss/db';
import { createPgUpdateStore } from '../apps/server/src/store/index.js';
import { freshPgliteDir } from '../test/support/pglite-template.js';
import { freshPostgresDatabase } from '../test/support/postgres.js';
import { seedDocuments } from '../test/sync/support/fixtures.js';
import { percentile } from './relay.bench.js';

const SECONDS = 4;
const IN_FLIGHT = 1_000;
const DOCS = 100;

function sampleUpdates(n: number): Uint8Array[] {
  const doc = new Y.Doc();
  const out: Uint8Array[] = [];
  doc.on('update', (u: Uint8Array) => out.push(u));
  for (let i = 0; i < n; i++) doc.getText('text').insert(0, 'she said ');
  return out;
}

async function measure(database: Database, docIds: string[], maxBatch: number) {
  const store = createPgUpdateStore(database, { maxBatch, compactMinBytes: 0 });
  const updates = sampleUpdates(256);
  const latencies: number[] = [];
  let done = 0;
  let i = 0;
  const until = performance.now() + SECONDS * 1000;
  const worker = async () => {
    while (performance.now() < until) {
      const k = i++;
      const t = performance.now();
      await store.append(docIds[k % docIds.length]!, updates[k % updates.length]!, null);
      latencies.push(performance.now() - t);
      done++;
    }
  };
  const started = performance.now();
  await Promise.all(Array.from({ length: maxBatch === 1 ? 1 : IN_FLIGHT }, worker));
  const elapsed = (performance.now() - started) / 1000;
  const { batches, rows } = store.stats();
  await store.close();
  latencies.sort((a, b) => a - b);
  return {
    updatesPerSec: Math.round(done / elapsed),
    rowsPerCommit: Math.round((rows / Math.max(1, batches)) * 10) / 10,
    appendP50Ms: Math.round(percentile(latencies, 50) * 100) / 100,
    appendP99Ms: Math.round(percentile(latencies, 99) * 100) / 100,
  };
}

export async function run(): Promise<Array<Record<string, unknown> & { name: string }>> {
  const records: Array<Record<string, unknown> & { name: string }> = [];
  const kinds: Array<'pglite' | 'postgres'> = process.env.DATABASE_URL ? ['pglite', 'postgres'] : ['pglite'];
  for (const kind of kinds) {
    let database: Database;
    let cleanup: () => Promise<void>;
    if (kind === 'pglite') {
      const folder = await freshPgliteDir();
      database = await openDatabase({ dataDir: folder.dir });
      cleanup = async () => folder.remove();
    } else {
      const fresh = await freshPostgresDatabase();
      database = await openDatabase({ databaseUrl: fresh.url, maxConnections: 4 });
      cleanup = () => fresh.drop();
    }
    try {
      const { docIds } = await seedDocuments(database, DOCS);
      for (const [mode, maxBatch] of [['group-commit', 2_000], ['one-commit-per-update', 1]] as const) {
        records.push({ name: 'durable', db: kind, mode, ...(await measure(database, docIds, maxBatch)), target: kind === 'postgres' && mode === 'group-commit' ? '>= 20000/s' : undefined });
      }
    } finally {
      await database.close();
      await cleanup();
    }
  }
  return records;
}
