/**
 * Retrieval and tables over HTTP on a real server: the invented sample study (interchange's
 * sample-study.ts) imported, projected, then queried with each filter; expected values worked out by
 * hand from the sample's words (which segment starts in which speaker turn, which overlap).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Db } from '@gloss/db';
import { applyImport } from '../../apps/server/src/exchange/apply-import.js';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { importQdpx } from '../../packages/interchange/src/refi/import.js';
import { addMember } from '../../apps/server/src/admin/index.js';
import { clientFor } from '../coding/support.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';

interface Table { rows: Array<{ id: string; label: string }>; cols: Array<{ id: string; label: string; cases?: number }>; cells: number[][]; caution: string; attributes: Array<{ id: string; name: string }>; cases: Array<{ id: string; name: string }>; coders: Array<{ id: string; name: string }>; speakers: string[]; texts: Array<{ id: string; title: string }> }
interface Hits { total: number; items: Array<{ quote: string; codeLabel: string; coderName: string; speaker: string | null; context: { before: string; after: string } | null }> }

async function seed(db: Db): Promise<BasicSeed & { imported: string }> {
  const base = await seedBasic(db);
  const noStore = { load: async () => ({ updates: [], seq: 0 }) }; // a new study reads no stored document
  const r = await applyImport(db, noStore, { newStudy: { title: 'Harbour lives' } }, importQdpx(projectQdpx(projectFile(sampleStudy(), 'analysis'))), base.users.owner.id, 'qdpx');
  await addMember(db, r.studyId, base.users.observer.id, 'observer', base.users.owner.id);
  return { ...base, imported: r.studyId };
}

describe.each(dbKinds().slice(-1))('retrieval and tables on %s', (db) => {
  let server: SpawnedServer<BasicSeed & { imported: string }>;
  let code: (label: string) => string;
  let t: Table;
  beforeAll(async () => {
    server = await spawnServer({ db, seed, startTimeoutMs: 180_000 });
    const owner = await clientFor(server.url, 'owner');
    // the projection catches up at start (documents written by the import): wait for all six segments
    await waitFor(async () => {
      const r = await owner.call<Table>('GET', `/api/studies/${server.seeded.imported}/tables?kind=frequency`);
      t = r.body;
      return r.status === 200 && r.body.cells.reduce((n, c) => n + c[0]!, 0) === 6;
    }, 'projection of the imported study', 60_000);
    code = (label) => t.rows.find((r) => r.label === label)!.id;
  }, 300_000);
  afterAll(async () => server?.stop());

  const get = async <T,>(path: string, who: 'owner' | 'observer' | 'outsider' = 'owner') => (await clientFor(server.url, who)).call<T>('GET', `/api/studies/${server.seeded.imported}${path}`);
  const quotes = async (q: string) => {
    const r = await get<Hits>(`/retrieval?${q}`);
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    return r.body.items.map((i) => i.quote);
  };

  it('frequencies with the caution, and the filters on offer', () => {
    expect(t.rows.map((r, i) => [r.label, ...t.cells[i]!])).toEqual([
      ['Work at sea', 2, 2, 2], // segments s1, s5; cases P01, P02; texts t1, t2
      ['Nets, "heavy"', 1, 1, 1],
      ['Catch', 1, 1, 1],
      ['Calm', 2, 1, 1],
    ]);
    expect(t.caution).toMatch(/frequency is not importance/);
    expect(t.speakers).toEqual(['I', 'P01']);
    expect(t.coders.map((c) => c.name)).toEqual(['Ada Quillfeather', 'Bo Lindqvist-Marr']);
  });

  it('retrieves by code, with the codes under it, coder, text, speaker, case and attribute; in context; paged', async () => {
    expect(await quotes(`code=${code('Work at sea')}`)).toEqual(['We rowed out', 'Line two, with a comma, and "quotes".']);
    expect(await quotes(`code=${code('Work at sea')}&descendants=true`)).toEqual(['We rowed out', 'The nets were 🐟🐟 heavy — ça pèse', '🐟🐟', 'Line two, with a comma, and "quotes".']);
    const bo = t.coders.find((c) => c.name === 'Bo Lindqvist-Marr')!.id;
    expect(await quotes(`coder=${bo}`)).toEqual(['The nets were 🐟🐟 heavy — ça pèse', '港口 was quiet.', 'Line two, with a comma, and "quotes".']);
    expect(await quotes(`text=${t.texts.find((x) => x.title === 'Ferry notes, P02')!.id}`)).toEqual(['Line two, with a comma, and "quotes".']);
    expect(await quotes('speaker=I')).toEqual(['The nets were 🐟🐟 heavy — ça pèse', '🐟🐟']); // both start in the interviewer's turn
    expect(await quotes(`case=${t.cases.find((c) => c.name === 'P02 Tomas')!.id}`)).toEqual(['Line two, with a comma, and "quotes".']);
    const port = t.attributes.find((a) => a.name === 'Home port')!.id;
    expect(await quotes(`attribute=${port}&value=North`)).toHaveLength(5);
    expect(await quotes(`code=${code('Nets, "heavy"')}&with=${code('Catch')}&mode=overlap`)).toEqual(['The nets were 🐟🐟 heavy — ça pèse']);
    expect(await quotes(`code=${code('Calm')}&with=${code('Work at sea')}&mode=overlap`)).toEqual([]);
    expect(await quotes(`code=${code('Calm')}&with=${code('Work at sea')}&mode=unit`)).toEqual(['"before the gulls",']); // same first turn as "We rowed out"

    const first = await get<Hits>(`/retrieval?code=${code('Work at sea')}`);
    expect(first.body.items[0]!.context).toMatchObject({ before: '', after: ' at dawn, "before the gulls", she said.' });
    expect(first.body.items[0]).toMatchObject({ codeLabel: 'Work at sea', coderName: 'Ada Quillfeather', speaker: 'P01' });
    const page = await get<Hits & { offset: number }>('/retrieval?limit=2&offset=2&sort=text');
    expect(page.body.total).toBe(6);
    expect(page.body.items.map((i) => i.quote)).toEqual(['The nets were 🐟🐟 heavy — ça pèse', '🐟🐟']); // 3rd and 4th by place: "We rowed out" 0, "\"before" 22, "The nets" 52, "🐟🐟" 66
    const bad = await get('/retrieval?limit=100000');
    expect(bad.status).toBe(400);
  }, 120_000);

  it('tables against hand-computed counts', async () => {
    const co = (await get<Table>('/tables?kind=cooccurrence&mode=overlap')).body;
    const cell = (m: Table, r: string, c: string) => m.cells[m.rows.findIndex((x) => x.label === r)]![m.cols.findIndex((x) => x.label === c)]!;
    expect(cell(co, 'Nets, "heavy"', 'Catch')).toBe(1);
    expect(cell(co, 'Work at sea', 'Calm')).toBe(0);
    const unit = (await get<Table>('/tables?kind=cooccurrence&mode=unit')).body;
    expect(cell(unit, 'Work at sea', 'Calm')).toBe(1); // turn 1 of the quay interview
    expect(cell(unit, 'Catch', 'Nets, "heavy"')).toBe(1);
    const port = t.attributes.find((a) => a.name === 'Home port')!.id;
    const byCases = (await get<Table>(`/tables?kind=code-by-attribute&attribute=${port}`)).body;
    expect(byCases.cols.map((c) => [c.label, c.cases])).toEqual([['North', 1], ['South', 1]]);
    expect(cell(byCases, 'Work at sea', 'North')).toBe(1);
    expect(cell(byCases, 'Calm', 'North')).toBe(1); // two segments, one case
    const bySegments = (await get<Table>(`/tables?kind=code-by-attribute&attribute=${port}&count=segments`)).body;
    expect(cell(bySegments, 'Calm', 'North')).toBe(2);
    const cbc = (await get<Table>('/tables?kind=case-by-code')).body;
    expect(cell(cbc, 'P01 Mira', 'Calm')).toBe(2);
    expect(cell(cbc, 'P02 Tomas', 'Work at sea')).toBe(1);
  }, 60_000);

  it('an observer may read; a non-member gets 404', async () => {
    expect((await get<Hits>('/retrieval', 'observer')).status).toBe(200);
    expect((await get<Hits>('/retrieval', 'outsider')).status).toBe(404);
  }, 60_000);
});
