/**
 * Retrieval and tables with calibration rounds on a real server: the `source` (coders or consensus)
 * and `round` filters, and which round layers analysis may read in which phase. The rule is the
 * project's own (issue 10: "where a calibration round is revealed or closed, analysis may use its
 * consensus layer"; issue 8: nobody but its coder reads a round layer while the round is independent).
 * Expected quotes and counts are worked out by hand from the seeded segments below.
 */
import { createRequire } from 'node:module';
import { addSegment, newLayerDoc } from '@gloss/model';
import type { Db } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type * as Y from 'yjs';
import { advanceRound, insertRound, roundLayers } from '../../apps/server/src/rounds/records.js';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { appendUpdate, clientFor, loadStoredDoc, seedCoding, type CodingSeed } from '../coding/support.js';
import type { Person } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';

const Papa = createRequire(new URL('../../packages/interchange/package.json', import.meta.url))('papaparse') as {
  parse<T>(s: string, o: object): { data: T[]; errors: unknown[] };
};

interface Seed extends CodingSeed {
  round1: string;
  round2: string;
}

/** A layer holding one segment per [code, words] (each found by its first occurrence in the text). */
function layerWith(text: Y.Doc, segs: Array<[string, string]>): Y.Doc {
  const layer = newLayerDoc();
  const content = text.getText('text').toString();
  for (const [codeId, words] of segs) {
    const start = content.indexOf(words);
    if (start < 0) throw new Error(`seed: "${words}" is not in the text`);
    addSegment(layer, text, { codeId, start, end: start + words.length }, () => 1000);
  }
  return layer;
}

/*
 * Coding text (created second): "… P01: My neighbour lent me a spade and a plot for the summer. … keys to the shed."
 * Basic text (created first):   "… P01: My neighbour lent me a spade and a plot."
 *   coder, outside rounds, coding text:   tools "lent me a spade"
 *   round 1 (revealed), coding text:      coder tools "spade"; coder2 time "a plot for the summer";
 *                                         consensus tools "lent me a spade", access "keys to the shed"
 *   round 2 (independent), basic text:    coder tools "spade"; consensus place "a plot" (written ahead)
 */
async function seed(db: Db): Promise<Seed> {
  const s = await seedCoding(db);
  const { tools, access, time, place } = s.codes;
  const coding = await loadStoredDoc(db, s.codingTextRoom);
  const basic = await loadStoredDoc(db, s.textRoom);
  await appendUpdate(db, await ensureLayer(db, s.studyId, s.codingTextId, s.users.coder.id), layerWith(coding, [[tools, 'lent me a spade']]));
  const start = (textIds: string[]) =>
    insertRound(db, { studyId: s.studyId, name: 'R', purpose: '', textIds, participantIds: [s.users.coder.id, s.users.coder2.id], unit: 'turn', statistic: 'krippendorff-alpha', createdBy: s.users.lead.id, codebook: null });
  const r1 = await start([s.codingTextId]);
  const r2 = await start([s.textId]);
  const write = async (roundId: string, coderId: string | null, text: Y.Doc, segs: Array<[string, string]>) => {
    const doc = (await roundLayers(db, roundId)).find((l) => l.coderId === coderId)!;
    await appendUpdate(db, doc.id, layerWith(text, segs));
  };
  await write(r1.id, s.users.coder.id, coding, [[tools, 'spade']]);
  await write(r1.id, s.users.coder2.id, coding, [[time, 'a plot for the summer']]);
  await write(r1.id, null, coding, [[tools, 'lent me a spade'], [access, 'keys to the shed']]);
  await write(r2.id, s.users.coder.id, basic, [[tools, 'spade']]);
  await write(r2.id, null, basic, [[place, 'a plot']]);
  await advanceRound(db, r1.id, 'revealed', s.users.lead.id);
  return { ...s, round1: r1.id, round2: r2.id };
}

interface Hits { total: number; items: Array<{ quote: string; kind: string; coderName: string; round: number | null }> }
interface Table { rows: Array<{ id: string; label: string }>; cells: number[][]; rounds: Array<{ number: number; phase: string; consensus: boolean }> }

describe.each(dbKinds().slice(-1))('analysis with rounds and consensus layers on %s', (kind) => {
  let server: SpawnedServer<Seed>;
  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed, startTimeoutMs: 180_000 });
    // the projection catches up at start: 5 segments readable by the owner (round 2 stays hidden)
    await waitFor(async () => (await get<Hits>('/retrieval?limit=500')).body.total === 5, 'projection of the seeded layers', 60_000);
  }, 300_000);
  afterAll(async () => server?.stop());

  const get = async <T,>(path: string, who: Person = 'owner') => (await clientFor(server.url, who)).call<T>('GET', `/api/studies/${server.seeded.studyId}${path}`);
  const quotes = async (q: string, who: Person = 'owner') => {
    const r = await get<Hits>(`/retrieval?${q}`, who);
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    return r.body.items.map((i) => i.quote);
  };
  const freq = async (q: string) => {
    const t = (await get<Table>(`/tables?kind=frequency&${q}`)).body;
    const c = server.seeded.codes;
    const names = { [c.tools]: 'tools', [c.access]: 'access', [c.time]: 'time', [c.place]: 'place' };
    return Object.fromEntries(t.rows.map((r, i) => [names[r.id]!, t.cells[i]![0]!]));
  };

  it('source=consensus gives the revealed round’s consensus only; an independent round’s stays hidden', async () => {
    expect(await quotes('source=consensus')).toEqual(['lent me a spade', 'keys to the shed']);
    const first = (await get<Hits>('/retrieval?source=consensus')).body.items[0]!;
    expect(first).toMatchObject({ kind: 'consensus', coderName: 'Consensus, round 1', round: 1 });
    expect(await quotes('source=consensus&round=2')).toEqual([]);
    // coders: the layer outside rounds and round 1's two coder layers, in text order
    expect(await quotes('source=coders')).toEqual(['lent me a spade', 'spade', 'a plot for the summer']);
    expect(await freq('source=consensus')).toEqual({ tools: 1, access: 1, time: 0, place: 0 });
  }, 60_000);

  it('round=N keeps that round’s layers (coders and consensus); a participant sees their own layer of an independent round', async () => {
    expect(await quotes('round=1')).toEqual(['lent me a spade', 'spade', 'a plot for the summer', 'keys to the shed']);
    expect(await freq('round=1')).toEqual({ tools: 2, access: 1, time: 1, place: 0 });
    expect(await quotes('round=1&source=coders')).toEqual(['spade', 'a plot for the summer']);
    expect(await quotes('round=2')).toEqual([]); // the owner reads no layer of an independent round
    expect(await quotes('round=2', 'coder')).toEqual(['spade']); // the coder's own round-2 layer
    const rounds = async (who: Person) => (await get<Table>('/tables?kind=frequency', who)).body.rounds;
    expect(await rounds('owner')).toEqual([{ number: 1, name: 'R', phase: 'revealed', consensus: true }]);
    expect((await rounds('coder')).map((r) => [r.number, r.consensus])).toEqual([[1, true], [2, false]]);
    expect((await get('/retrieval?round=0')).status).toBe(400);
    expect((await get('/retrieval?source=nobody')).status).toBe(400);
  }, 60_000);

  it('the segments CSV of consensus layers: revealed rounds only, each as "Consensus, round N"', async () => {
    const lead = await clientFor(server.url, 'lead');
    const csv = async (q: string) => {
      const r = await fetch(`${server.url}/api/studies/${server.seeded.studyId}/export?format=csv${q}`, { headers: { cookie: lead.cookie, origin: server.url } });
      expect(r.status).toBe(200);
      // read back with papaparse (RFC 4180), as the exports tests do
      const rows = Papa.parse<Record<string, string>>((await r.text()).replace(/^\uFEFF/, ''), { header: true, newline: '\r\n', skipEmptyLines: true });
      expect(rows.errors).toEqual([]);
      return rows.data.map((x) => [x.quote, x.coder, x.round]);
    };
    expect(await csv('&layers=consensus')).toEqual([
      ['lent me a spade', 'Consensus, round 1', '1'],
      ['keys to the shed', 'Consensus, round 1', '1'],
    ]);
    expect(await csv('')).toEqual([['lent me a spade', 'Rua Taliaferro', '']]); // default: coders' layers outside rounds
    const qdpx = await fetch(`${server.url}/api/studies/${server.seeded.studyId}/export?format=qdpx&layers=consensus`, { headers: { cookie: lead.cookie, origin: server.url } });
    expect(qdpx.status).toBe(400);
  }, 60_000);

  it('a closed round’s consensus stays in analysis; revealing the other round brings its consensus in', async () => {
    const lead = await clientFor(server.url, 'lead');
    expect((await lead.call('POST', `/api/rounds/${server.seeded.round1}/close`)).status).toBe(200);
    expect(await quotes('source=consensus')).toEqual(['lent me a spade', 'keys to the shed']);
    expect((await lead.call('POST', `/api/rounds/${server.seeded.round2}/reveal`)).status).toBe(200);
    expect(await quotes('source=consensus&round=2')).toEqual(['a plot']);
    expect(await quotes('source=consensus')).toEqual(['a plot', 'lent me a spade', 'keys to the shed']); // the basic text was added first
  }, 60_000);
});
