/**
 * Progress across rounds over HTTP in a reflexive study (issue 9 item 6: "In reflexive studies, no
 * coefficient: the counts of the comparison categories instead"). A real server process, stock
 * y-websocket clients: a trainee and a coder code one text in a round, the lead reveals it and chooses
 * the coder's round layer as the reference, and `GET /api/studies/:id/supervision/progress` gives the
 * trainee's point with no value and the category counts — the same counts the comparison route gives for
 * the same two layers at the study's tolerance. Why no coefficient: reflexive thematic analysis does not
 * measure agreement (Braun & Clarke 2019, "Reflecting on reflexive thematic analysis", as cited in
 * apps/server/src/supervision/progress-point.ts); the categories are the project's (comparison.ts).
 */
import { addSegment } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REFLEXIVE } from '../../apps/server/src/supervision/progress-point.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';
import type { RoundOut } from '../rounds/support.js';

interface Point {
  roundId: string;
  value: number | null;
  note?: string;
  texts: number;
  counts: { matched: number; missed: number; extra: number; otherCode: number; otherBoundary: number };
}

describe.each(dbKinds())('reflexive progress over HTTP on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding, startTimeoutMs: 240_000 });
  }, 300_000);
  afterAll(async () => server?.stop());

  it('a trainee’s point in a reflexive study has the comparison counts and no coefficient', async () => {
    const s = server.seeded;
    const [owner, lead, coder, trainee] = await Promise.all([clientFor(server.url, 'owner'), clientFor(server.url, 'lead'), clientFor(server.url, 'coder'), clientFor(server.url, 'trainee')]);
    expect((await owner.call('PATCH', `/api/studies/${s.studyId}`, { mode: 'reflexive' })).status).toBe(200);
    const started = await lead.call<RoundOut>('POST', `/api/studies/${s.studyId}/rounds`, {
      name: 'Reflexive round',
      textIds: [s.codingTextId],
      participantIds: [s.users.coder.id, s.users.trainee.id],
      unit: 'sentence',
      statistic: 'krippendorff-alpha',
    });
    expect(started.status).toBe(201);
    const roundId = started.body.id;
    const layerOf = async (who: typeof coder) => (await who.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body.texts[0]!.layers.find((l) => l.mine)!.room;
    const [coderLayer, traineeLayer] = [await layerOf(coder), await layerOf(trainee)];

    const writers = [
      gcOffClient(server.url, coder.cookie, s.codingTextRoom),
      gcOffClient(server.url, coder.cookie, coderLayer),
      gcOffClient(server.url, trainee.cookie, s.codingTextRoom),
      gcOffClient(server.url, trainee.cookie, traineeLayer),
    ];
    try {
      await until(() => writers.every((w) => w.provider.synced), 'writers synced');
      const [cText, cLayer, tText, tLayer] = writers as [(typeof writers)[0], (typeof writers)[0], (typeof writers)[0], (typeof writers)[0]];
      const code = (layer: typeof cLayer, text: typeof cText, words: string, codeId: string) => {
        const at = text.doc.getText('text').toString().indexOf(words);
        return addSegment(layer.doc, text.doc, { codeId, start: at, end: at + words.length });
      };
      // Reference (the coder): tools on the spade, access on the keys. Trainee: access on the spade
      // (another code), nothing on the keys (missed), the site on the plot (extra).
      const mine = [code(cLayer, cText, 'lent me a spade', s.codes.tools), code(cLayer, cText, 'keys to the shed', s.codes.access)];
      const theirs = [code(tLayer, tText, 'lent me a spade', s.codes.access), code(tLayer, tText, 'a plot for the summer', s.codes.place)];
      const stored = async (who: typeof coder, ids: string[]) => {
        const segs = (await who.call<Array<{ id: string }>>('GET', `/api/texts/${s.codingTextId}/segments`)).body.map((x) => x.id);
        return ids.every((id) => segs.includes(id));
      };
      await until(async () => (await stored(coder, mine)) && (await stored(trainee, theirs)), 'both layers stored');
    } finally {
      for (const w of writers) w.destroy();
    }

    expect((await lead.call('POST', `/api/rounds/${roundId}/reveal`)).status).toBe(200);
    expect((await lead.call('PUT', `/api/texts/${s.codingTextId}/reference`, { layer: coderLayer })).status).toBe(200);
    const settings = (await lead.call<{ toleranceWords: number }>('GET', `/api/studies/${s.studyId}/supervision/settings`)).body;
    const cmp = await lead.call<Record<'missed' | 'extra' | 'otherCode' | 'otherBoundary', unknown[]>>(
      'GET',
      `/api/texts/${s.codingTextId}/comparison?layer=${traineeLayer}&reference=${coderLayer}&tolerance=${settings.toleranceWords}`,
    );
    expect(cmp.status).toBe(200);

    const res = await lead.call<{ mode: string; trainees: Array<{ userId: string; points: Point[] }> }>('GET', `/api/studies/${s.studyId}/supervision/progress`);
    expect(res.status).toBe(200);
    expect(res.body.mode).toBe('reflexive');
    const point = res.body.trainees.find((t) => t.userId === s.users.trainee.id)!.points.find((p) => p.roundId === roundId)!;
    expect(point.value).toBeNull();
    expect(point.note).toBe(REFLEXIVE);
    expect(point.texts).toBe(1);
    expect({ missed: point.counts.missed, extra: point.counts.extra, otherCode: point.counts.otherCode, otherBoundary: point.counts.otherBoundary }).toEqual({
      missed: cmp.body.missed.length,
      extra: cmp.body.extra.length,
      otherCode: cmp.body.otherCode.length,
      otherBoundary: cmp.body.otherBoundary.length,
    });
    // the hand-built case: one of each of missed, extra and other code
    expect([point.counts.missed, point.counts.extra, point.counts.otherCode]).toEqual([1, 1, 1]);
    // the trainee is not a supervisor: the progress route is refused to them
    expect((await trainee.call('GET', `/api/studies/${s.studyId}/supervision/progress`)).status).toBe(403);
  }, 180_000);
});
