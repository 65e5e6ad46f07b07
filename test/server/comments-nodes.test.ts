/**
 * Comment events across two server processes on one PostgreSQL database with Redis: a reply posted
 * through node B reaches a listener on node A live. Runs when DATABASE_URL and REDIS_URL are set
 * (CI sets both); skipped otherwise.
 */
import { addSegment } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clientFor, gcOffClient, seedCoding, type CodingSeed } from '../coding/support.js';
import { apiClient } from '../support/http.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { collectEvents, type SseEvent } from '../support/sse.js';
import { waitFor } from '../support/wait.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);

describe.runIf(enabled)('comment events on two nodes', () => {
  let a: SpawnedServer<CodingSeed>;
  let b: SpawnedServer<undefined>;

  beforeAll(async () => {
    const redis = { REDIS_URL: process.env.REDIS_URL! };
    a = await spawnServer({ db: 'postgres', seed: seedCoding, env: redis });
    b = await spawnServer({ db: 'postgres', sameDatabaseAs: a, env: redis });
  }, 180_000);
  afterAll(async () => {
    await b?.stop();
    await a?.stop();
  });

  it('tells a listener on node A of a reply posted through node B', async () => {
    const s = a.seeded;
    const coder = await clientFor(a.url, 'coder');
    const lead = await clientFor(a.url, 'lead');
    const room = (await coder.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`)).body.layers.find((l) => l.mine)!.room;
    const text = gcOffClient(a.url, coder.cookie, s.codingTextRoom);
    const layer = gcOffClient(a.url, coder.cookie, room);
    const events: SseEvent[] = [];
    let stop: () => Promise<unknown> = () => Promise.resolve();
    try {
      await waitFor(() => text.provider.synced && layer.provider.synced, 'coder synced');
      const start = text.doc.getText('text').toString().indexOf('keys');
      const segmentId = addSegment(layer.doc, text.doc, { codeId: s.codes.access, start, end: start + 4 });
      const base = `/api/texts/${s.codingTextId}/comments`;
      let thread = '';
      await waitFor(async () => {
        const res = await lead.call<{ comment: { id: string } }>('POST', base, { layer: room, segmentId, body: 'Whose keys?' });
        thread = res.body.comment?.id ?? '';
        return res.status === 201;
      }, 'the lead commented');

      const live = await fetch(`${a.url}/api/studies/${s.studyId}/comments/events`, { headers: { cookie: lead.cookie, origin: a.url } });
      stop = collectEvents(live, events);
      await waitFor(() => events.some((e) => e.event === 'ready'), 'stream ready on node A');
      // The same session works on node B (sessions live in the shared database).
      const coderOnB = apiClient(b.url, coder.cookie);
      const reply = await coderOnB.call<{ comment: { id: string } }>('POST', base, { parentId: thread, body: 'The committee’s.' }, {});
      expect(reply.status).toBe(201);
      await waitFor(
        () => events.some((e) => e.event === 'comment' && (e.data as { commentId: string }).commentId === reply.body.comment.id),
        'the reply made on node B reached the listener on node A',
      );
    } finally {
      await stop();
      text.destroy();
      layer.destroy();
    }
  }, 120_000);
});
