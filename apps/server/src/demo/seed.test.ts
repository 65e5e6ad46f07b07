import { documents, memberships, studies, texts, users } from '@gloss/db';
import * as M from '@gloss/model';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { dbKinds, openTestDatabase } from '../../../../test/support/database.js';
import { loadDemo } from '../../../../demo/load.js';
import { createPgUpdateStore } from '../store/index.js';
import { seedDemo } from './seed.js';

// The demo files are the source of truth here: the seeded database must hold exactly what they say.
const demo = loadDemo();
const demoCodes = demo.codebook as Array<{ id: string; examples: string[]; nearMisses: string[] }>;

describe.each(dbKinds())('demo seeding on %s', (kind) => {
  let database: Awaited<ReturnType<typeof openTestDatabase>>;
  beforeAll(async () => {
    database = await openTestDatabase(kind);
  }, 120_000);
  afterAll(async () => database?.close());

  // Read documents through the server's own update store, so this sees exactly what a sync room loads.
  async function docState(docId: string): Promise<Y.Doc> {
    const store = createPgUpdateStore(database);
    try {
      const { updates } = await store.load(docId);
      expect(updates.length, `stored state of ${docId}`).toBeGreaterThan(0);
      const doc = new Y.Doc({ gc: false });
      for (const u of updates) Y.applyUpdate(doc, u);
      return doc;
    } finally {
      await store.close();
    }
  }

  it('loads accounts, members, texts, codebook, cases, memos and two coders\' layers', async () => {
    const result = await seedDemo(database.db);
    expect(result.seeded).toBe(true);
    const db = database.db;

    const accounts = demo.accounts as Array<{ email: string; role: string }>;
    expect((await db.select().from(users)).map((u) => u.email).sort()).toEqual(accounts.map((a) => a.email).sort());
    const members = await db.select().from(memberships).where(eq(memberships.studyId, result.studyId!));
    expect(members.map((m) => m.role).sort()).toEqual(accounts.map((a) => a.role).sort());

    const textRows = await db.select().from(texts).where(eq(texts.studyId, result.studyId!));
    expect(textRows).toHaveLength((demo.index as unknown[]).length);
    for (const t of textRows) expect(t.wordCount).toBeGreaterThanOrEqual(1500);

    const [cbRow] = await db.select().from(documents).where(and(eq(documents.studyId, result.studyId!), eq(documents.kind, 'codebook')));
    const cb = await docState(cbRow!.id);
    expect(M.getCodes(cb).map((c) => c.id).sort()).toEqual(demoCodes.map((c) => c.id).sort());
    expect(M.listExclusiveSets(cb).length).toBeGreaterThan(0);
    expect(M.listCases(cb).length).toBe((demo.cases as { cases: unknown[] }).cases.length);

    // Every example still quotes its words when resolved against its text document.
    const textDocs = new Map<string, Y.Doc>();
    for (const t of textRows) {
      const [d] = await db.select().from(documents).where(and(eq(documents.textId, t.id), eq(documents.kind, 'text')));
      textDocs.set(t.id, await docState(d!.id));
    }
    let examples = 0;
    for (const code of M.getCodes(cb)) {
      for (const ex of [...code.examples, ...code.nearMisses]) {
        const doc = textDocs.get(ex.textId)!;
        const start = M.resolveAnchor(doc, ex.start!);
        const end = M.resolveAnchor(doc, ex.end!);
        expect(M.readText(doc).slice(start!, end!)).toBe(ex.quote);
        examples++;
      }
    }
    expect(examples).toBe(demoCodes.reduce((n, c) => n + c.examples.length + c.nearMisses.length, 0));

    // Layers: two texts x two coders, every segment resolving to words of its text.
    const layers = await db.select().from(documents).where(and(eq(documents.studyId, result.studyId!), eq(documents.kind, 'layer')));
    expect(layers).toHaveLength(4);
    for (const l of layers) {
      const layer = await docState(l.id);
      const resolved = M.resolveSegments(textDocs.get(l.textId!)!, M.listSegments(layer));
      expect(resolved.length).toBeGreaterThan(0);
      for (const s of resolved) {
        expect(s.orphaned).toBe(false);
        expect(s.quote.length).toBe(s.end - s.start);
      }
    }
  }, 120_000);

  it('does nothing the second time', async () => {
    const again = await seedDemo(database.db);
    expect(again.seeded).toBe(false);
    expect(await database.db.select().from(studies)).toHaveLength(1);
  }, 60_000);
});
