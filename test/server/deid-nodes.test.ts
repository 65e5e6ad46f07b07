/**
 * The purge on two server nodes (one PostgreSQL database, Redis between them; issue 12 item 6): a
 * stock y-websocket client on node B holds the text with its history and keeps sending updates that
 * carry the original name while node A purges. Afterwards no table holds the original (this test's own scan of every
 * table), the client was told 4410 (RFC 6455 §7.4.2 leaves 4000–4999 to applications) and its old
 * copy, brought to the rebuilt room, is closed with 4410 before anything of it is stored.
 * Runs when DATABASE_URL and REDIS_URL are set (CI sets both); skipped otherwise.
 */
import * as Y from 'yjs';
import { addTextFromTranscript, transcriptFromPlainText } from '../../apps/server/src/admin/index.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clientFor, gcOffClient } from '../coding/support.js';
import { scanForOriginals } from '../support/original-scan.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import type { Db } from '@gloss/db';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);
const ORIGINALS = ['Dana Whitcombe', 'Dana', 'Lowmere'];

interface Seed extends BasicSeed {
  deidTextId: string;
  deidRoom: string;
}

async function seed(db: Db): Promise<Seed> {
  const base = await seedBasic(db);
  const t = await addTextFromTranscript(db, base.studyId, {
    title: 'Helpers',
    transcript: transcriptFromPlainText('P3: Dana Whitcombe drove me to Lowmere every week.'),
    sourceFormat: 'txt',
    createdBy: base.users.owner.id,
  });
  return { ...base, deidTextId: t.id, deidRoom: t.room };
}

describe.runIf(enabled)('the purge on two nodes', () => {
  let a: SpawnedServer<Seed>;
  let b: SpawnedServer<undefined>;

  beforeAll(async () => {
    const redis = { REDIS_URL: process.env.REDIS_URL! };
    a = await spawnServer({ db: 'postgres', seed, env: redis });
    b = await spawnServer({ db: 'postgres', sameDatabaseAs: a, env: redis });
  }, 360_000);
  afterAll(async () => {
    await b?.stop();
    await a?.stop();
  });

  it('an old client on node B that keeps typing the name cannot bring it back after node A purges', async () => {
    const s = a.seeded;
    const lead = await clientFor(a.url, 'lead');
    const old = gcOffClient(b.url, lead.cookie, s.deidRoom);
    const closes: number[] = [];
    old.provider.on('connection-close', (e: CloseEvent | null) => void (e && closes.push(e.code)));
    let typing: NodeJS.Timeout | undefined;
    try {
      await waitFor(() => old.provider.synced, 'old client synced on node B', 60_000);
      const replacements = [
        { original: 'Dana Whitcombe', pseudonym: '[Person 1]', kind: 'person' },
        { original: 'Dana', pseudonym: '[Person 1]', kind: 'person' },
        { original: 'Lowmere', pseudonym: '[Town A]', kind: 'place' },
      ];
      expect((await lead.call('POST', `/api/studies/${s.studyId}/deid/apply`, { replacements })).status).toBe(200);
      const text = old.doc.getText('text');
      await waitFor(() => text.toString().includes('[Person 1] drove me to [Town A]'), 'the replacement reached node B', 60_000);
      // the old copy keeps typing the original name and taking it out again, each in one update, so every
      // update carries the name's bytes (gc off keeps deleted content) while the text itself never holds
      // it; the interval is a load generator, not a timing assumption
      let typed = 0;
      typing = setInterval(() => {
        old.doc.transact(() => {
          const at = text.length;
          text.insert(at, ' Dana');
          text.delete(at, 5);
        });
        typed++;
      }, 10);
      await waitFor(() => typed >= 5, 'the old client typed before the purge', 60_000);

      const purge = await lead.call<{ scan: { occurrences: number }; texts: Array<{ textId: string; newRoom: string }> }>('POST', `/api/studies/${s.studyId}/deid/purge`, {});
      expect(purge.status).toBe(200);
      expect(purge.body.scan.occurrences).toBe(0);
      await waitFor(() => closes.includes(4410), 'node B closed the old client with 4410', 60_000);
      clearInterval(typing);
      // after the close nothing of the old room can be stored (its document is gone: appends are refused)
      expect(await a.withDb((db) => scanForOriginals(db, ORIGINALS))).toEqual({});

      // the old copy, brought to the rebuilt room on node B, is refused before anything is stored
      const newRoom = purge.body.texts.find((t) => t.textId === s.deidTextId)!.newRoom;
      const copy = new Y.Doc({ gc: false });
      Y.applyUpdate(copy, Y.encodeStateAsUpdate(old.doc));
      old.destroy();
      const again = gcOffClient(b.url, lead.cookie, newRoom);
      const againCloses: number[] = [];
      again.provider.on('connection-close', (e: CloseEvent | null) => void (e && againCloses.push(e.code)));
      // the client's own doc is replaced by the old copy before it connects: hand it the old state first
      Y.applyUpdate(again.doc, Y.encodeStateAsUpdate(copy));
      await waitFor(() => againCloses.includes(4410), 'the old copy was closed with 4410 in the rebuilt room', 60_000);
      again.destroy();
      expect(await a.withDb((db) => scanForOriginals(db, ORIGINALS))).toEqual({});
      // a fresh client of the rebuilt room reads the de-identified text
      const fresh = gcOffClient(a.url, lead.cookie, newRoom);
      await waitFor(() => fresh.provider.synced, 'fresh client synced', 60_000);
      expect(fresh.doc.getText('text').toString()).toContain('[Person 1] drove me to [Town A] every week.');
      fresh.destroy();
    } finally {
      if (typing) clearInterval(typing);
      old.destroy();
    }
  }, 300_000);
});
