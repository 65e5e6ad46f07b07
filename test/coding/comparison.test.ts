/**
 * GET /api/texts/:id/comparison against a real server: a trainee and the lead code one text through
 * stock y-websocket clients; the lead compares the trainee's layer with their own. The expected
 * categories are worked out by hand from the words (definitions: packages/model comparison.ts,
 * common practice in supervised coding review).
 */
import { addSegment, listSegments } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type * as Y from 'yjs';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

interface Entry {
  start: number;
  end: number;
  quote: string;
  codeIds: string[];
}
interface ComparisonOut {
  missed: Entry[];
  extra: Entry[];
  otherCode: Entry[];
  otherBoundary: Entry[];
  counts: Record<string, { matched: number }>;
}

describe.each(dbKinds())('layer comparison on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('sorts the trainee’s segments against the lead’s into missed, extra, other code and other boundary', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const trainee = await clientFor(server.url, 'trainee');
    const ownRoom = async (c: typeof lead) =>
      (await c.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`)).body.layers.find((l) => l.mine)!.room;
    const leadRoom = await ownRoom(lead);
    const traineeRoom = await ownRoom(trainee);

    const clients = [
      gcOffClient(server.url, lead.cookie, s.codingTextRoom),
      gcOffClient(server.url, lead.cookie, leadRoom),
      gcOffClient(server.url, trainee.cookie, s.codingTextRoom),
      gcOffClient(server.url, trainee.cookie, traineeRoom),
    ];
    const [leadText, leadLayer, traineeText, traineeLayer] = clients as [(typeof clients)[0], (typeof clients)[0], (typeof clients)[0], (typeof clients)[0]];
    try {
      await until(() => clients.every((c) => c.provider.synced), 'clients synced');
      const code = (layer: Y.Doc, textDoc: Y.Doc, codeId: string, words: string) => {
        const start = textDoc.getText('text').toString().indexOf(words);
        return addSegment(layer, textDoc, { codeId, start, end: start + words.length });
      };
      // The reference (the lead).
      code(leadLayer.doc, leadText.doc, s.codes.tools, 'lent me a spade'); // trainee: same code, same words
      code(leadLayer.doc, leadText.doc, s.codes.access, 'the committee gave us keys to the shed'); // trainee: "keys to the shed" only
      code(leadLayer.doc, leadText.doc, s.codes.time, 'for the summer'); // trainee: nothing there
      code(leadLayer.doc, leadText.doc, s.codes.place, 'the allotment'); // trainee: another code
      // The trainee.
      code(traineeLayer.doc, traineeText.doc, s.codes.tools, 'lent me a spade');
      code(traineeLayer.doc, traineeText.doc, s.codes.access, 'keys to the shed');
      code(traineeLayer.doc, traineeText.doc, s.codes.time, 'allotment');
      code(traineeLayer.doc, traineeText.doc, s.codes.place, 'My neighbour'); // nothing in the reference there

      // What the lead reads over sync is what the server has stored (it commits before relaying).
      const check = gcOffClient(server.url, lead.cookie, traineeRoom);
      clients.push(check);
      await until(() => listSegments(check.doc).length === 4 && listSegments(leadLayer.doc).length === 4, 'both layers stored');

      const path = `/api/texts/${s.codingTextId}/comparison?layer=${traineeRoom}&reference=${leadRoom.toUpperCase()}&tolerance=1`;
      const res = await lead.call<ComparisonOut>('GET', path);
      expect(res.status).toBe(200);
      const places = (xs: Entry[]) => xs.map((e) => [e.quote, e.codeIds]);
      expect(places(res.body.missed)).toEqual([['for the summer', [s.codes.time]]]);
      expect(places(res.body.extra)).toEqual([['My neighbour', [s.codes.place]]]);
      expect(places(res.body.otherCode)).toEqual([['the allotment', [s.codes.place, s.codes.time]]]);
      // "the committee gave us" lies four words before the trainee's start: past a tolerance of one word.
      expect(places(res.body.otherBoundary)).toEqual([['the committee gave us keys to the shed', [s.codes.access]]]);
      expect(res.body.counts[s.codes.tools]).toMatchObject({ matched: 1 });
      const text = leadText.doc.getText('text').toString();
      for (const e of [...res.body.missed, ...res.body.extra, ...res.body.otherCode, ...res.body.otherBoundary]) {
        expect(text.slice(e.start, e.end)).toBe(e.quote);
      }
      // With a tolerance of four words the boundary difference is accepted.
      const lenient = await lead.call<ComparisonOut>('GET', path.replace('tolerance=1', 'tolerance=4'));
      expect(lenient.body.otherBoundary).toEqual([]);
    } finally {
      for (const c of clients) c.destroy();
    }
  }, 120_000);

  it('refuses bad parameters, layers of other texts and people outside the study', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const room = (await lead.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`)).body.layers.find((l) => l.mine)!.room;
    const base = `/api/texts/${s.codingTextId}/comparison`;
    expect((await lead.call('GET', `${base}?layer=${room}`)).status).toBe(400);
    expect((await lead.call('GET', `${base}?layer=nope&reference=${room}`)).status).toBe(400);
    expect((await lead.call('GET', `${base}?layer=${room}&reference=${room}&tolerance=-1`)).status).toBe(400);
    // The text document itself is no layer.
    expect((await lead.call('GET', `${base}?layer=${room}&reference=${s.codingTextRoom}`)).status).toBe(404);
    const outsider = await clientFor(server.url, 'outsider');
    expect((await outsider.call('GET', `${base}?layer=${room}&reference=${room}`)).status).toBe(404);
  }, 60_000);
});
