/**
 * Heavy work runs off the event loop (issue 13 item 3): while an agreement report with 10,000
 * bootstrap replicates is being computed for one person, another person's sync connection is answered
 * (sync step 1 → step 2, y-protocols 1.0.7) and health answers; and a person who asks for too many
 * heavy requests gets a 429 with Retry-After and words. Nothing here is timed: the probe's answer is
 * sandwiched between two health answers that both say the report is still running. Common practice
 * (a worker pool keeps the event loop free); status 429 and Retry-After: RFC 6585 §4.
 */
import { addSegment, newLayerDoc } from '@gloss/model';
import type { Db } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addTextFromTranscript, ensureLayer, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { appendUpdate, loadStoredDoc } from '../coding/support.js';
import { apiClient, signIn } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { isSyncStep2, openProbe, syncStep1 } from '../support/sync-probe.js';
import { waitFor } from '../support/wait.js';

const CODES = ['plots', 'tools', 'weather', 'neighbours', 'money'];

/** A seeded pseudo-random generator (mulberry32), so the study is the same every run. */
function random(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Six texts of forty turns, three coders with sixty segments each per text: a report that takes a while with 10,000 replicates. */
async function seedLargeStudy(db: Db): Promise<BasicSeed> {
  const s = await seedBasic(db);
  const rnd = random(13);
  for (let t = 0; t < 6; t++) {
    const lines = Array.from({ length: 40 }, (_, i) => `P0${i % 3}: Remark ${i} about the plot and the shed. Then a word on the weather, ${t}.`);
    const text = await addTextFromTranscript(db, s.studyId, { title: `Long interview ${t}`, transcript: transcriptFromPlainText(lines.join('\n')), sourceFormat: 'txt', createdBy: s.users.owner.id });
    const textDoc = await loadStoredDoc(db, text.room);
    const length = textDoc.getText('text').length;
    for (const who of ['coder', 'coder2', 'lead'] as const) {
      const layer = newLayerDoc();
      for (let k = 0; k < 60; k++) {
        const start = Math.floor(rnd() * (length - 60));
        addSegment(layer, textDoc, { codeId: CODES[Math.floor(rnd() * CODES.length)]!, start, end: start + 10 + Math.floor(rnd() * 40) });
      }
      await appendUpdate(db, await ensureLayer(db, s.studyId, text.id, s.users[who].id), layer);
    }
  }
  return s;
}

describe('heavy work off the event loop', () => {
  let server: SpawnedServer<BasicSeed>;
  beforeAll(async () => {
    // Two heavy requests a minute per person, so the limit is reached within the test.
    server = await spawnServer({ db: 'pglite', seed: seedLargeStudy, env: { HEAVY_PER_MINUTE: '2', HEAVY_THREADS: '1' }, startTimeoutMs: 180_000 });
  }, 360_000);
  afterAll(async () => server?.stop());

  it('answers another person’s sync while a 10,000-replicate bootstrap runs, and the report arrives', async () => {
    const { url, seeded } = server;
    const owner = apiClient(url, await signIn(url, PEOPLE.owner.email, PASSWORD));
    const running = async () => ((await owner.call<{ heavy: { running: number } }>('GET', '/api/health')).body.heavy?.running ?? 0) > 0;
    const probe = await openProbe(url, seeded.textRoom, await signIn(url, PEOPLE.coder.email, PASSWORD));
    try {
      const report = owner.call<{ bootstrap?: { replicates: number } }>('GET', `/api/studies/${seeded.studyId}/agreement?unit=sentence&bootstrap=10000&seed=3`);
      await waitFor(running, 'the report to be running in its worker');
      const from = probe.received.length;
      probe.send(syncStep1());
      const answer = await probe.next(isSyncStep2, from);
      expect(answer.byteLength).toBeGreaterThan(0);
      // Still running after the answer: the sync reply was not waiting for the report.
      expect(await running()).toBe(true);
      const done = await report;
      expect(done.status).toBe(200);
      expect(done.body.bootstrap).toMatchObject({ replicates: 10_000 });
    } finally {
      probe.close();
    }
  }, 180_000);

  it('refuses a person’s third heavy request within the minute with 429, Retry-After and words; others are not affected', async () => {
    const { url, seeded } = server;
    const lead = apiClient(url, await signIn(url, PEOPLE.lead.email, PASSWORD));
    const path = `/api/studies/${seeded.studyId}/agreement?texts=${seeded.textId}`;
    expect((await lead.call('GET', path)).status).toBe(200);
    expect((await lead.call('GET', path)).status).toBe(200);
    const refused = await lead.call<{ error: { code: string; message: string } }>('GET', path);
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe('rate_limited');
    expect(refused.body.error.message).toMatch(/Try again in \d+ s/);
    expect(Number(refused.headers.get('retry-after'))).toBeGreaterThan(0);
    // Exports are heavy too: the same person's budget is spent.
    expect((await lead.call('GET', `/api/studies/${seeded.studyId}/export?format=codebook-md`)).status).toBe(429);
    // The observer has a budget of their own.
    const observer = apiClient(url, await signIn(url, PEOPLE.observer.email, PASSWORD));
    expect((await observer.call('GET', path)).status).toBe(200);
  }, 120_000);
});
