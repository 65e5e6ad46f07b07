/**
 * REFI-QDA through the database, on PGlite and PostgreSQL: an invented study (with text outside the
 * BMP, nested codes, sets, cases and memos) imported into a new study, exported as .qdpx (validated
 * against the standard's Project.xsd), imported again into another new study, and compared — quotes,
 * not offsets. Also: every other export runs on it and the audit log records each; a failure in the
 * middle of the write leaves no row behind (one transaction).
 */
import { createRequire } from 'node:module';
import { type Database, auditLog, documents, eq, memberships, sql, studies, texts, updates, users } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { applyImport } from '../../apps/server/src/exchange/apply-import.js';
import { loadStudy } from '../../apps/server/src/exchange/load-study.js';
import { runExport, EXPORT_FORMATS, type ExportFormat } from '../../apps/server/src/exchange/run-export.js';
import { createPgUpdateStore, type PgUpdateStore } from '../../apps/server/src/store/index.js';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import type { StudyData } from '../../packages/interchange/src/exchange/study-data.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { importQdc, importQdpx } from '../../packages/interchange/src/refi/import.js';
import { validateAgainst } from '../../packages/interchange/src/refi/schema-check.js';
import { dbKinds, openTestDatabase } from '../support/database.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';

const req = createRequire(new URL('../../packages/interchange/package.json', import.meta.url));
const { unzipSync, strFromU8 } = req('fflate') as { unzipSync(b: Uint8Array): Record<string, Uint8Array>; strFromU8(b: Uint8Array): string };
const Papa = req('papaparse') as { parse<T>(s: string, o: object): { data: T[]; errors: unknown[] } };

async function bytesOf(body: AsyncIterable<Uint8Array>): Promise<Uint8Array> {
  const parts: Uint8Array[] = [];
  for await (const p of body) parts.push(p);
  return Buffer.concat(parts);
}

/** What a round trip must keep, named by words rather than ids or offsets. */
function comparable(s: Pick<StudyData, 'texts' | 'codes' | 'segments' | 'coders' | 'memos' | 'cases' | 'attributes' | 'groups'>) {
  const code = (id: string | null) => s.codes.find((c) => c.id === id)?.label ?? null;
  const coder = (id: string) => s.coders.find((c) => c.id === id)?.name ?? '?';
  const text = (id: string) => s.texts.find((t) => t.id === id)?.title ?? '?';
  const attr = (id: string) => s.attributes.find((a) => a.id === id)?.name ?? '?';
  return {
    texts: s.texts.map((t) => [t.title, t.content, t.turns.map((u) => u.speaker).join('|')]).sort(),
    codes: s.codes.map((c) => [c.label, code(c.parentId), c.colour, c.briefDefinition, c.inclusion, c.exclusion]).sort(),
    segments: s.segments.map((x) => [text(x.textId), coder(x.coderId), code(x.codeId), x.quote]).map(String).sort(),
    memos: s.memos.map((m) => [m.kind, m.title, m.body, coder(m.author), m.attachedTo.kind]).map(String).sort(),
    cases: s.cases.map((c) => [c.name, c.kind, JSON.stringify(Object.entries(c.values).map(([k, v]) => [attr(k), v]).sort()), c.textIds.map(text).join('|')]).sort(),
    attributes: s.attributes.map((a) => [a.name, a.type, (a.choices ?? []).join('|')]).sort(),
    groups: s.groups.map((g) => [g.label, g.kind, g.codeIds.map(code).sort().join('|')]).sort(),
  };
}

async function studyData(db: Database['db'], store: PgUpdateStore, studyId: string): Promise<StudyData> {
  const l = await loadStudy(db, store, studyId);
  const all = [];
  for await (const x of l.texts()) all.push(x);
  return { ...l.frame, texts: all.map((x) => x.text), segments: all.flatMap((x) => x.segments) };
}

describe.each(dbKinds())('REFI-QDA round trip through the database on %s', (kind) => {
  let database: Database;
  let store: PgUpdateStore;
  let seed: BasicSeed;
  let first = '';

  beforeAll(async () => {
    database = await openTestDatabase(kind);
    seed = await seedBasic(database.db);
    store = createPgUpdateStore(database);
  }, 600_000); // a PGlite copy and seeding took over 3 minutes once on the loaded 2-core machine
  afterAll(async () => {
    await store?.close();
    await database?.close();
  });

  it('imports a project into a new study, exports it valid, and a second import keeps everything', async () => {
    const original = sampleStudy();
    const report = await applyImport(database.db, store, { newStudy: { title: 'Harbour (imported)' } }, importQdpx(projectQdpx(projectFile(original, 'scope-1'))), seed.users.owner.id, 'qdpx');
    first = report.studyId;
    expect(report).toMatchObject({ created: true, texts: 2, codes: 4, segments: 6, memos: 4, cases: 2, endReading: 'exclusive' });
    expect(report.coders.map((c) => c.account)).toEqual(['created', 'created']);
    const a = await studyData(database.db, store, first);
    expect(comparable(a)).toEqual(comparable(original));

    const out = await runExport(database.db, store, first, 'qdpx', { actorId: seed.users.owner.id, via: 'http' });
    const zip = await bytesOf(out.body);
    const qde = strFromU8(unzipSync(zip)['project.qde']!);
    const v = await validateAgainst(qde, 'project');
    expect(v.errors).toEqual([]);

    const again = await applyImport(database.db, store, { newStudy: { title: 'Harbour (again)' } }, importQdpx(zip), seed.users.lead.id, 'qdpx');
    // matched by email this time (the file also lists the first study's owner, who exported it)
    expect(again.coders.filter((c) => c.account === 'created')).toEqual([]);
    expect(again.coders.map((c) => c.name)).toEqual(expect.arrayContaining(['Ada Quillfeather', 'Bo Lindqvist-Marr']));
    const b = await studyData(database.db, store, again.studyId);
    expect(comparable(b)).toEqual(comparable(original));
    const [row] = await database.db.select().from(studies).where(eq(studies.id, again.studyId));
    expect(row!.title).toBe('Harbour (again)');
    const [m] = await database.db.select().from(memberships).where(sql`${memberships.studyId} = ${again.studyId} and ${memberships.userId} = ${seed.users.lead.id}`);
    expect(m!.role).toBe('owner');
  }, 120_000);

  it('every export format runs, validates where a schema exists, and is in the audit log with who and what', async () => {
    const seen: Record<string, string> = {};
    for (const format of EXPORT_FORMATS) {
      const progress: number[] = [];
      const r = await runExport(database.db, store, first, format as ExportFormat, { actorId: seed.users.lead.id, via: 'http', onProgress: (f) => progress.push(f) });
      const bytes = await bytesOf(r.body);
      seen[format] = format === 'qdpx' ? '' : strFromU8(bytes);
      expect(progress.at(-1)).toBe(1);
    }
    expect((await validateAgainst(seen.qdc!, 'codebook')).errors).toEqual([]);
    expect(importQdc(seen.qdc!).codes).toHaveLength(4);
    const rows = Papa.parse<string[]>(seen.csv!.replace(/^\uFEFF/, ''), { newline: '\r\n', skipEmptyLines: true });
    expect(rows.errors).toEqual([]);
    expect(rows.data.slice(1).map((r) => r[10]).sort()).toEqual(sampleStudy().segments.map((s) => s.quote).sort());
    expect(seen['codebook-md']).toContain('#### Catch');
    expect(seen['memos-md']).toContain('## Jottings (1)');
    const log = await database.db.select().from(auditLog).where(sql`${auditLog.studyId} = ${first} and ${auditLog.action} = 'export'`);
    expect(log.filter((e) => e.userId === seed.users.lead.id).map((e) => (e.detail as { format: string }).format).sort()).toEqual([...EXPORT_FORMATS].sort());
  }, 120_000);

  it('a failure in the middle of the write leaves nothing behind', async () => {
    const count = async () => {
      const n = async (t: typeof studies | typeof texts | typeof documents | typeof updates | typeof users | typeof memberships | typeof auditLog) =>
        Number((await database.db.select({ n: sql<number>`count(*)` }).from(t))[0]!.n);
      return [await n(studies), await n(texts), await n(documents), await n(updates), await n(users), await n(memberships), await n(auditLog)];
    };
    const before = await count();
    // The database itself refuses layer documents for a moment (a trigger): the import has by then
    // written the study, accounts, texts and their documents inside its transaction.
    await database.db.execute(sql.raw(`create function refuse_layer() returns trigger language plpgsql as $$ begin if new.kind = 'layer' then raise exception 'refused for the test'; end if; return new; end $$`));
    await database.db.execute(sql.raw('create trigger refuse_layer before insert on documents for each row execute function refuse_layer()'));
    try {
      const data = importQdpx(projectQdpx(projectFile({ ...sampleStudy(), coders: [{ id: 'u-new', name: 'Nel Farrow', email: 'nel@example.org' }], segments: sampleStudy().segments.map((s) => ({ ...s, coderId: 'u-new' })) }, 'scope-2')));
      await expect(applyImport(database.db, store, { newStudy: { title: 'Never' } }, data, seed.users.owner.id, 'qdpx')).rejects.toThrow(/insert into "documents"/);
    } finally {
      await database.db.execute(sql.raw('drop trigger refuse_layer on documents'));
      await database.db.execute(sql.raw('drop function refuse_layer()'));
    }
    expect(await count()).toEqual(before);
    expect(await database.db.select().from(users).where(eq(users.email, 'nel@example.org'))).toEqual([]);
  }, 60_000);
});
