/**
 * An import into an existing study reaches open screens live (issue 10): a stock y-websocket client
 * holding the codebook and memos rooms receives the imported codes and memos without reconnecting,
 * and the study's event stream says "imported" (with the new texts) only once retrieval already counts
 * the imported segments. An upload says "texts-added". With PostgreSQL and Redis the import goes to one
 * node and the listener sits on the other, so the news crosses the relay.
 * The expected counts are those of the invented sample study (interchange's sample-study.ts).
 */
import { getCodes, listMemos } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { clientFor, gcOffClient } from '../coding/support.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { collectEvents, type SseEvent } from '../support/sse.js';
import { waitFor } from '../support/wait.js';

describe.each(dbKinds().slice(-1))('an import seen live on %s', (kind) => {
  const twoNodes = kind === 'postgres' && Boolean(process.env.REDIS_URL);
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<unknown>;
  beforeAll(async () => {
    const env: Record<string, string> = twoNodes ? { REDIS_URL: process.env.REDIS_URL! } : {};
    a = await spawnServer({ db: kind, seed: seedBasic, env, startTimeoutMs: 180_000 });
    b = twoNodes ? await spawnServer({ db: kind, sameDatabaseAs: a as SpawnedServer<unknown>, env, startTimeoutMs: 180_000 }) : (a as SpawnedServer<unknown>);
  }, 400_000);
  afterAll(async () => {
    if (twoNodes) await b?.stop();
    await a?.stop();
  });

  it('codes and memos arrive in the open rooms; the event comes once retrieval counts the segments', async () => {
    const s = a.seeded;
    const lead = await clientFor(b.url, 'lead');
    const codebook = gcOffClient(b.url, lead.cookie, s.codebookRoom);
    const memos = gcOffClient(b.url, lead.cookie, s.memosRoom);
    const events: SseEvent[] = [];
    const stream = await fetch(`${b.url}/api/studies/${s.studyId}/events`, { headers: { cookie: lead.cookie, origin: b.url } });
    expect(stream.status).toBe(200);
    const stop = collectEvents(stream, events);
    try {
      await waitFor(() => codebook.provider.synced && memos.provider.synced && events.some((e) => e.event === 'ready'), 'rooms synced and events ready');
      expect(getCodes(codebook.doc)).toHaveLength(0);

      const owner = await clientFor(a.url, 'owner');
      const file = projectQdpx(projectFile(sampleStudy(), 'live'));
      const res = await fetch(`${a.url}/api/studies/${s.studyId}/import?format=qdpx`, {
        method: 'POST',
        headers: { cookie: owner.cookie, origin: a.url, 'content-type': 'application/octet-stream' },
        body: file as BodyInit,
      });
      expect(res.status, await res.clone().text()).toBe(201);

      // the sample study: 4 codes, 4 memos and jottings, 2 texts, 6 segments
      await waitFor(() => getCodes(codebook.doc).length === 4 && listMemos(memos.doc).length === 4, 'imported codes and memos in the open rooms');
      expect(getCodes(codebook.doc).map((c) => c.label).sort()).toEqual(['Calm', 'Catch', 'Nets, "heavy"', 'Work at sea']);
      await waitFor(() => events.some((e) => e.event === 'study'), 'the study event');
      const news = events.find((e) => e.event === 'study')!.data as { action: string; textIds: string[] };
      expect(news.action).toBe('imported');
      expect(news.textIds).toHaveLength(2);
      // told only after projection: retrieval counts the imported segments at once
      const hits = await lead.call<{ total: number }>('GET', `/api/studies/${s.studyId}/retrieval?limit=1`);
      expect(hits.body.total).toBe(6);
      const listed = await lead.call<Array<{ id: string }>>('GET', `/api/studies/${s.studyId}/texts`);
      expect(listed.body.map((t) => t.id)).toEqual(expect.arrayContaining(news.textIds));

      // an upload is news too
      const form = new FormData();
      form.set('file', new Blob(['Interviewer: And the shed?\nP01: Always open.'], { type: 'text/plain' }), 'shed.txt');
      const up = await fetch(`${a.url}/api/studies/${s.studyId}/texts/import`, { method: 'POST', headers: { cookie: owner.cookie, origin: a.url }, body: form });
      expect(up.status, await up.clone().text()).toBe(201);
      const added = ((await up.json()) as { id: string }).id;
      await waitFor(() => events.some((e) => e.event === 'study' && (e.data as { action: string }).action === 'texts-added'), 'the upload event');
      expect(events.filter((e) => e.event === 'study').at(-1)!.data).toEqual({ action: 'texts-added', textIds: [added] });
    } finally {
      await stop();
      codebook.destroy();
      memos.destroy();
    }
  }, 180_000);

  it('a non-member cannot listen', async () => {
    const outsider = await clientFor(b.url, 'outsider');
    const res = await fetch(`${b.url}/api/studies/${a.seeded.studyId}/events`, { headers: { cookie: outsider.cookie, origin: b.url } });
    expect(res.status).toBe(404);
    await res.body?.cancel();
  }, 60_000);
});
