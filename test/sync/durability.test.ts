/**
 * Commit before relay, end to end: every update a second client has received survives `kill -9`
 * of the server (the real server process, PGlite and, with DATABASE_URL, PostgreSQL).
 * The guarantee is DESIGN.md §6's write-ahead rule ("written before the update is relayed").
 */
import { addMemo, listMemos } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnServer, dbKinds, type SpawnedServer } from '../support/server.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { waitFor } from './support/harness.js';
import { cookieFor, remoteClient } from './support/remote.js';

describe.each(dbKinds())('durability across kill -9 on %s', (db) => {
  let server: SpawnedServer<BasicSeed>;

  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedBasic });
  }, 120_000);
  afterAll(async () => server?.stop());

  it('everything a peer received is there after a hard kill and restart', async () => {
    const room = server.seeded.memosRoom;
    const writer = remoteClient(server.url, await cookieFor(server.url, 'coder'), room);
    const reader = remoteClient(server.url, await cookieFor(server.url, 'coder2'), room);
    await waitFor(() => writer.provider.synced && reader.provider.synced, 'both synced', 20_000);
    // Memos of the writer's own: the memos room refuses anything else (checked on the server per update).
    const author = server.seeded.users.coder.id;
    for (let i = 0; i < 200; i++) addMemo(writer.doc, { kind: 'jotting', author, title: `jotting ${i} about the plot waiting list`, attachedTo: { kind: 'study' } });
    // Kill as soon as the reader has seen some, while later ones may still be in flight.
    await waitFor(() => reader.doc.getMap('memos').size >= 50, 'reader received a share', 20_000);
    expect(await server.kill('SIGKILL')).toBeNull();
    const seen = new Map(listMemos(reader.doc).map((m) => [m.id, m.title]));
    writer.destroy();
    reader.destroy();
    expect(seen.size).toBeGreaterThanOrEqual(50);

    await server.restart();
    const fresh = remoteClient(server.url, await cookieFor(server.url, 'coder2'), room);
    try {
      await waitFor(() => fresh.provider.synced, 'fresh client synced', 20_000);
      const after = new Map(listMemos(fresh.doc).map((m) => [m.id, m.title]));
      for (const [key, value] of seen) expect(after.get(key), key).toBe(value);
    } finally {
      fresh.destroy();
    }
  }, 120_000);
});
