/**
 * The projection resumes where it stopped (issue 11 item 5): a start projects only the documents whose
 * log moved past their projection, counted through the projector's own `projected` figure across real
 * restarts of the database (PGlite from its data folder, PostgreSQL from its database).
 */
import { openDatabase, projectedSegments, eq, type Database } from '@gloss/db';
import { addSegment, correctText } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { createProjector, documentsBehind, loadDoc, scheduleCatchUp } from '../../apps/server/src/projection/index.js';
import { createPgUpdateStore } from '../../apps/server/src/store/index.js';
import type { UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { dbKinds, freshPgliteDir, freshPostgresDatabase } from '../support/database.js';
import { seedCoding, type CodingSeed } from './support.js';
import { appendChange } from '../support/store-change.js';

describe.each(dbKinds())('projection resumes on %s', (kind) => {
  let open: () => Promise<Database>;
  let remove: () => Promise<void>;
  let seed: CodingSeed;
  const layers: string[] = [];

  /** One node's life: open, catch up, drain, stop. Returns what it noted and what it projected. */
  async function start(beforeCatchUp?: (store: UpdateStore, database: Database) => Promise<void>) {
    const database = await open();
    const store = createPgUpdateStore(database);
    const projector = createProjector({ db: database.db, store, delayMs: 10_000 });
    try {
      await beforeCatchUp?.(store, database);
      await store.flush();
      const noted = await scheduleCatchUp(database.db, projector);
      await projector.flush();
      const rows = await database.db.select().from(projectedSegments).where(eq(projectedSegments.textId, seed.codingTextId));
      return { noted, projected: projector.projected, rows };
    } finally {
      await projector.close();
      await store.close();
      await database.close();
    }
  }

  beforeAll(async () => {
    if (kind === 'pglite') {
      const folder = await freshPgliteDir();
      open = () => openDatabase({ dataDir: folder.dir });
      remove = async () => folder.remove();
    } else {
      const fresh = await freshPostgresDatabase();
      open = () => openDatabase({ databaseUrl: fresh.url, maxConnections: 3 });
      remove = () => fresh.drop();
    }
    const database = await open();
    try {
      seed = await seedCoding(database.db);
      for (const coder of [seed.users.coder.id, seed.users.coder2.id, seed.users.lead.id]) {
        layers.push(await ensureLayer(database.db, seed.studyId, seed.codingTextId, coder));
      }
    } finally {
      await database.close();
    }
  }, 60_000);
  afterAll(async () => {
    await remove?.();
  });

  it('projects every document once, then nothing on a start with no changes', async () => {
    const first = await start();
    // Every layer (the seed's texts have layers too), the codebook and the memos: none projected before.
    expect(first.noted).toBeGreaterThanOrEqual(layers.length + 2);
    expect(first.projected).toBe(first.noted);

    const second = await start();
    expect(second).toMatchObject({ noted: 0, projected: 0 });
    expect(second.rows).toEqual(first.rows);
  }, 60_000);

  it('after a layer change committed without projection, the next start projects that layer alone', async () => {
    let segId = '';
    const result = await start(async (store, database) => {
      const textDoc = await loadDoc(store, seed.codingTextRoom);
      const words = 'a spade and a plot';
      const at = textDoc.getText('text').toString().indexOf(words);
      await appendChange(store, layers[0]!, (l) => {
        segId = addSegment(l, textDoc, { codeId: seed.codes.tools, start: at, end: at + words.length });
      });
      textDoc.destroy();
      await store.flush();
      expect(await documentsBehind(database.db)).toEqual([layers[0]]);
    });
    expect(result).toMatchObject({ noted: 1, projected: 1 });
    expect(result.rows.map((r) => [r.id, r.quote])).toEqual([[segId, 'a spade and a plot']]);
    expect((await start()).projected).toBe(0);
  }, 60_000);

  it("after a text correction, the next start projects that text's layers and nothing else", async () => {
    const result = await start(async (store, database) => {
      await appendChange(store, seed.codingTextRoom, (t) => correctText(t, t.getText('text').toString().indexOf('and a plot'), 4));
      await store.flush();
      const behind = await documentsBehind(database.db);
      expect([...behind].sort()).toEqual([...layers].sort());
    });
    expect(result).toMatchObject({ noted: layers.length, projected: layers.length });
    expect(result.rows.map((r) => r.quote)).toEqual(['a spade a plot']);
    expect((await start()).projected).toBe(0);
  }, 60_000);
});
