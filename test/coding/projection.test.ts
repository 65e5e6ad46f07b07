/**
 * The projection in process, on a real database of each kind and the real PostgreSQL-backed update
 * store: committed changes reach the tables within a deadline (polled), a text correction moves the
 * segments of every layer on the text, and a document that cannot be projected is logged without
 * breaking the store, then projected on its next change.
 */
import { type Database, eq, sql, projectedCaseTexts, projectedCases, projectedCodes, projectedMemos, projectedSegments } from '@gloss/db';
import { addCase, addMemo, addSegment, correctText, getSegmentsMap, linkText, updateCodeField } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { createProjector, loadDoc, projectDocument, withProjection, type Projector } from '../../apps/server/src/projection/index.js';
import { createPgUpdateStore, type PgUpdateStore } from '../../apps/server/src/store/index.js';
import type { UpdateStore } from '../../apps/server/src/sync/contracts.js';
import { dbKinds, openTestDatabase } from '../support/database.js';
import { seedCoding, until, type CodingSeed } from './support.js';
import { appendChange } from '../support/store-change.js';

describe.each(dbKinds())('projection on %s', (kind) => {
  let database: Database;
  let inner: PgUpdateStore;
  let store: UpdateStore;
  let projector: Projector;
  let seed: CodingSeed;
  const errors: Array<{ err: unknown; docId: string }> = [];

  beforeAll(async () => {
    database = await openTestDatabase(kind);
    seed = await seedCoding(database.db);
    inner = createPgUpdateStore(database);
    projector = createProjector({ db: database.db, store: inner, delayMs: 50, onError: (err, docId) => errors.push({ err, docId }) });
    store = withProjection(inner, projector);
  }, 60_000);
  afterAll(async () => {
    await store?.close();
    await database?.close();
  });

  const segmentRows = () => database.db.select().from(projectedSegments).where(eq(projectedSegments.textId, seed.codingTextId));

  it('segments follow layer changes and text corrections within the deadline', async () => {
    const layer = await ensureLayer(database.db, seed.studyId, seed.codingTextId, seed.users.coder.id);
    const textDoc = await loadDoc(store, seed.codingTextRoom);
    let segId = '';
    await appendChange(store, layer, (l) => {
      const words = 'a spade and a plot';
      const start = textDoc.getText('text').toString().indexOf(words);
      segId = addSegment(l, textDoc, { codeId: seed.codes.tools, start, end: start + words.length });
    });
    // No flush here: the debounced projection must catch up by itself.
    await until(async () => (await segmentRows()).length === 1, 'segment projected', 10_000);
    expect((await segmentRows())[0]).toMatchObject({ id: segId, layerDocId: layer, coderId: seed.users.coder.id, codeId: seed.codes.tools, quote: 'a spade and a plot', orphaned: false });

    // A correction inside the passage changes only the text document; the layer's rows must follow.
    await appendChange(store, seed.codingTextRoom, (t) => correctText(t, t.getText('text').toString().indexOf('and a plot'), 4));
    await until(async () => (await segmentRows())[0]?.quote === 'a spade a plot', 'quote re-projected after the correction', 10_000);
    textDoc.destroy();
  }, 60_000);

  it('codes, cases and memos are projected from the codebook and memos documents', async () => {
    await appendChange(store, seed.codebookRoom, (cb) => {
      updateCodeField(cb, seed.codes.time, 'briefDefinition', 'Talk of seasons and harvests.', { by: seed.users.lead.id });
      const caseId = addCase(cb, { name: 'P01', kind: 'participant' });
      linkText(cb, caseId, seed.codingTextId);
    });
    await appendChange(store, seed.memosRoom, (m) => {
      addMemo(m, { author: seed.users.coder.id, title: 'Lending', body: 'Tools travel along the hedges.', attachedTo: { kind: 'code', codeId: seed.codes.tools } });
    });
    await projector.flush();
    const codes = await database.db.select().from(projectedCodes).where(eq(projectedCodes.studyId, seed.studyId));
    expect(codes.map((c) => c.label).sort()).toEqual(['Access to shared things', 'Borrowed tools', 'Seasons', 'The site']);
    expect(codes.find((c) => c.id === seed.codes.time)!.briefDefinition).toBe('Talk of seasons and harvests.');
    const cases = await database.db.select().from(projectedCases).where(eq(projectedCases.studyId, seed.studyId));
    expect(cases).toMatchObject([{ name: 'P01', kind: 'participant' }]);
    const links = await database.db.select().from(projectedCaseTexts).where(eq(projectedCaseTexts.studyId, seed.studyId));
    expect(links).toMatchObject([{ caseId: cases[0]!.id, textId: seed.codingTextId }]);
    const memos = await database.db.select().from(projectedMemos).where(eq(projectedMemos.studyId, seed.studyId));
    expect(memos).toMatchObject([{ author: seed.users.coder.id, attachedKind: 'code', attachedRef: seed.codes.tools, title: 'Lending', body: 'Tools travel along the hedges.' }]);
  }, 60_000);

  it('a document the database refuses is logged, the store keeps working, and the next change projects it', async () => {
    const layer = await ensureLayer(database.db, seed.studyId, seed.codingTextId, seed.users.coder2.id);
    errors.length = 0;
    // A real refusal by the database: a constraint (added for this test) that the projected row breaks.
    await database.db.execute(sql`alter table segments add constraint test_refuse_keys check (quote <> 'keys')`);
    const textDoc = await loadDoc(store, seed.codingTextRoom);
    const at = textDoc.getText('text').toString().indexOf('keys');
    let segId = '';
    await appendChange(store, layer, (l) => {
      segId = addSegment(l, textDoc, { codeId: seed.codes.access, start: at, end: at + 4 });
    });
    await projector.flush();
    expect(errors.map((e) => e.docId)).toEqual([layer]);
    // The log took the change all the same.
    const loaded = await loadDoc(store, layer);
    expect(getSegmentsMap(loaded).has(segId)).toBe(true);
    loaded.destroy();
    expect((await segmentRows()).filter((r) => r.layerDocId === layer)).toEqual([]);

    await database.db.execute(sql`alter table segments drop constraint test_refuse_keys`);
    await appendChange(store, layer, (l) => {
      addSegment(l, textDoc, { codeId: seed.codes.access, start: at + 5, end: at + 7 });
    });
    textDoc.destroy();
    await projector.flush();
    const rows = (await segmentRows()).filter((r) => r.layerDocId === layer);
    expect(rows.map((r) => r.quote).sort()).toEqual(['keys', 'to']);
    expect(errors).toHaveLength(1);
  }, 60_000);

  it('two nodes projecting the same text at once take turns instead of colliding', async () => {
    // Each "node" is its own projection call on the shared database (PostgreSQL: separate connections).
    const before = (await segmentRows()).map((r) => [r.id, r.quote]).sort();
    expect(before.length).toBeGreaterThan(0);
    // The text (all its layers) and single layers, interleaved: they all rewrite the same rows.
    const layerIds = [...new Set((await segmentRows()).map((r) => r.layerDocId))];
    const ids = Array.from({ length: 8 }, (_, i) => (i % 2 ? seed.codingTextRoom : layerIds[i % layerIds.length]!));
    await Promise.all(ids.map((id) => projectDocument(database.db, inner, id)));
    expect((await segmentRows()).map((r) => [r.id, r.quote]).sort()).toEqual(before);
  }, 60_000);
});
