/**
 * Threaded comments on segments against a real server (issue: supervision): a trainee codes through a
 * stock y-websocket client, the lead comments, the trainee reads it under "feedback for me" and
 * replies, and the reply reaches the lead live over server-sent events. The author is stamped by the
 * server; rights follow the layer's readers. (Expected behaviour is the issue's; common practice.)
 */
import { addSegment } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { collectEvents, type SseEvent } from '../support/sse.js';
import { clientFor, gcOffClient, seedCoding, until, type CodingSeed } from './support.js';

interface Thread {
  id: string;
  author: { id: string; name: string };
  body: string;
  layer: string;
  segmentId: string;
  coderId: string;
  resolvedAt: string | null;
  replies: Array<{ id: string; author: { id: string }; body: string }>;
}

describe.each(dbKinds())('comments on segments on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('threads: server-stamped author, feedback for me, a live reply, resolve and re-open by the right people', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const trainee = await clientFor(server.url, 'trainee');
    const coder2 = await clientFor(server.url, 'coder2');
    const layerRoom = (await trainee.call<{ layers: Array<{ room: string; mine: boolean }> }>('GET', `/api/texts/${s.codingTextId}`)).body.layers.find((l) => l.mine)!.room;
    const text = gcOffClient(server.url, trainee.cookie, s.codingTextRoom);
    const layer = gcOffClient(server.url, trainee.cookie, layerRoom);
    const events: SseEvent[] = [];
    let stopEvents: () => Promise<unknown> = () => Promise.resolve();
    try {
      await until(() => text.provider.synced && layer.provider.synced, 'trainee synced');
      const words = 'a spade and a plot';
      const start = text.doc.getText('text').toString().indexOf(words);
      const segmentId = addSegment(layer.doc, text.doc, { codeId: s.codes.tools, start, end: start + words.length });
      const base = `/api/texts/${s.codingTextId}/comments`;

      // The segment reaches the server before anyone can comment on it (commit before relay).
      let first: { status: number; body: { thread: Thread } } | undefined;
      await until(async () => {
        first = await lead.call<{ thread: Thread }>('POST', base, { layer: layerRoom, segmentId, body: 'Is the plot a tool here, or a place?' });
        return first.status !== 404;
      }, 'the lead can comment on the stored segment');
      expect(first!.status).toBe(201);
      const thread = first!.body.thread;
      expect(thread).toMatchObject({ author: { id: s.users.lead.id, name: 'Tomas Ekwueme' }, segmentId, layer: layerRoom, coderId: s.users.trainee.id, resolvedAt: null, quote: words });

      // A forged author, a segment that does not exist, an empty body: refused, nothing stored.
      const forged = await trainee.call<{ error: { code: string } }>('POST', base, { parentId: thread.id, body: 'I agree.', authorId: s.users.lead.id });
      expect(forged.status).toBe(400);
      expect((await trainee.call('POST', base, { layer: layerRoom, segmentId: 'no-such-segment', body: 'Hm' })).status).toBe(404);
      expect((await trainee.call('POST', base, { parentId: thread.id, body: '   ' })).status).toBe(400);

      // The trainee sees the thread on the text and under feedback for them.
      const feedback = await trainee.call<{ threads: Array<Thread & { textTitle: string }> }>('GET', `/api/studies/${s.studyId}/feedback`);
      expect(feedback.body.threads.map((t) => [t.id, t.textTitle])).toEqual([[thread.id, 'Allotment interview 2']]);

      // The lead listens live; the trainee replies; the lead is told and reads the reply.
      const live = await fetch(`${server.url}/api/studies/${s.studyId}/comments/events`, { headers: { cookie: lead.cookie, origin: server.url } });
      expect(live.status).toBe(200);
      stopEvents = collectEvents(live, events);
      await until(() => events.some((e) => e.event === 'ready'), 'event stream ready');
      const reply = await trainee.call<{ comment: { id: string } }>('POST', base, { parentId: thread.id, body: 'A tool: they lent it for digging.' });
      expect(reply.status).toBe(201);
      await until(() => events.some((e) => e.event === 'comment' && (e.data as { commentId: string }).commentId === reply.body.comment.id), 'the reply event reached the lead');
      const onText = await lead.call<{ threads: Thread[] }>('GET', base);
      expect(onText.body.threads[0]!.replies.map((r) => [r.author.id, r.body])).toEqual([[s.users.trainee.id, 'A tool: they lent it for digging.']]);
      // The lead's own thread with the trainee's answer is feedback for the lead too.
      const leadFeedback = await lead.call<{ threads: Thread[] }>('GET', `/api/studies/${s.studyId}/feedback`);
      expect(leadFeedback.body.threads.map((t) => t.id)).toEqual([thread.id]);

      // Resolve: not by another coder; by the segment's coder or a lead; re-open likewise.
      expect((await coder2.call('POST', `/api/comments/${thread.id}/resolve`)).status).toBe(403);
      const resolved = await lead.call<{ thread: Thread }>('POST', `/api/comments/${thread.id}/resolve`);
      expect(resolved.status).toBe(200);
      expect(resolved.body.thread.resolvedAt).not.toBeNull();
      const reopened = await trainee.call<{ thread: Thread }>('POST', `/api/comments/${thread.id}/reopen`);
      expect(reopened.body.thread.resolvedAt).toBeNull();
      expect((await trainee.call('POST', `/api/comments/${reply.body.comment.id}/resolve`)).status).toBe(400);
      await until(() => events.filter((e) => e.event === 'comment').length >= 3, 'resolve and re-open events');

      // Outsiders learn nothing, not even that the thread exists.
      const outsider = await clientFor(server.url, 'outsider');
      expect((await outsider.call('GET', base)).status).toBe(404);
      expect((await outsider.call('POST', `/api/comments/${thread.id}/resolve`)).status).toBe(404);
      expect((await outsider.call('GET', `/api/studies/${s.studyId}/feedback`)).status).toBe(404);
      expect((await outsider.call('POST', base, { parentId: thread.id, body: 'hello' })).status).toBe(404);
    } finally {
      await stopEvents();
      text.destroy();
      layer.destroy();
    }
  }, 120_000);
});
