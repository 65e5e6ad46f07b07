/**
 * A room unloaded and opened again while Redis is down. Two real server processes share one
 * PostgreSQL database and a private redis-server (this test's own, on a free port). Node B unloads a
 * room as soon as its last client leaves (ROOM_IDLE_SECONDS=0). With Redis killed, B's room unloads
 * and a stock y-websocket client opens it again on B: the room must load from the database and serve
 * it without waiting for the relay (it used to wait for its SUBSCRIBE in ioredis's offline queue, which
 * fails after the retries, so the client never synced until Redis was back). Both nodes keep
 * committing meanwhile. Once Redis is back, B subscribes the room it opened while Redis was down (seen
 * in Redis's own PUBSUB NUMSUB), and the clients on both nodes converge on everything written.
 * Needs DATABASE_URL (and REDIS_URL, which marks a CI-like run: then this runs, never skips).
 */
import { addMemo } from '@gloss/model';
import type * as Y from 'yjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPrivateRedis, type PrivateRedis } from '../support/private-services.js';
import { seedBasic, type BasicSeed, type Person } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { cookieFor, remoteClient } from '../sync/support/remote.js';
import { tokensInDatabase } from './database-state.js';
import { tokensIn } from './storm.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);
// A cold start of a node on a shared 2-core machine under heavy load has taken over 60 s.
const START_MS = 180_000;

describe.runIf(enabled)('a room reopened while Redis is down', () => {
  let redis: PrivateRedis;
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<undefined>;

  beforeAll(async () => {
    redis = await startPrivateRedis();
    a = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, seed: seedBasic, env: { REDIS_URL: redis.url } });
    b = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, sameDatabaseAs: a, env: { REDIS_URL: redis.url, ROOM_IDLE_SECONDS: '0' } });
  }, 3 * START_MS);

  afterAll(async () => {
    await b?.stop();
    await a?.stop();
    await redis?.stop();
  });

  it('loads the room from the database and serves it with Redis down, then relays and converges once Redis is back', async () => {
    const seed = a.seeded;
    const room = seed.memosRoom;
    const channel = `gloss:room:${room}`;
    const subscribers = async () => Number((await redis.cli('pubsub', 'numsub', channel)).split('\n').at(-1));
    const [coder, coder2, owner] = await Promise.all((['coder', 'coder2', 'owner'] as const).map((p) => cookieFor(a.url, p)));
    // Room counts in /api/health are shown to an owner (http/health.ts).
    const roomsOn = async (node: SpawnedServer<unknown>) => {
      const body = (await (await fetch(`${node.url}/api/health`, { headers: { cookie: owner! } })).json()) as { sync?: { rooms: number } };
      return body.sync!.rooms;
    };
    const write = (doc: Y.Doc, person: Person, token: string) =>
      addMemo(doc, { kind: 'jotting', author: seed.users[person].id, title: token, attachedTo: { kind: 'study' } });
    const holds = (doc: Y.Doc, tokens: string[]) => {
      const held = tokensIn(doc);
      return tokens.every((t) => held.has(t));
    };
    const logHolds = async (tokens: string[]) => {
      const held = (await tokensInDatabase(a.dbEnv.DATABASE_URL!, room)).tokens;
      return tokens.every((t) => held.has(t));
    };

    const onA = remoteClient(a.url, coder!, room);
    const first = remoteClient(b.url, coder2!, room);
    let onB: ReturnType<typeof remoteClient> | null = null;
    try {
      await waitFor(() => onA.provider.synced && first.provider.synced, 'both clients synced', 60_000);
      await waitFor(async () => (await subscribers()) === 2, 'both nodes subscribed to the room', 30_000);
      write(onA.doc, 'coder', 'before');
      await waitFor(() => holds(first.doc, ['before']), 'the first write reached node B', 60_000);

      await redis.kill();
      first.destroy();
      await waitFor(async () => (await roomsOn(b)) === 0, 'the room unloaded on node B with Redis down', 60_000);

      // Opened again on B, Redis still down: loaded from the database, served at once.
      onB = remoteClient(b.url, coder2!, room);
      const reopened = onB;
      await waitFor(() => reopened.provider.synced, 'a client on node B synced with Redis down', 60_000);
      expect(holds(reopened.doc, ['before'])).toBe(true);
      write(reopened.doc, 'coder2', 'down-b');
      write(onA.doc, 'coder', 'down-a');
      // Each node stores before it applies or relays; the log holds both writes while Redis is down.
      await waitFor(() => logHolds(['down-a', 'down-b']), 'both writes committed with Redis down', 60_000);

      // Redis back on the same port: B subscribes the room it opened meanwhile, A renews its own.
      await redis.start();
      await waitFor(async () => (await subscribers()) === 2, 'both nodes subscribed to the room again', 60_000);
      write(onA.doc, 'coder', 'after-a');
      write(reopened.doc, 'coder2', 'after-b');
      const all = ['before', 'down-a', 'down-b', 'after-a', 'after-b'];
      await waitFor(() => holds(onA.doc, all) && holds(reopened.doc, all), 'both clients hold every write', 60_000);
      expect(await logHolds(all)).toBe(true);
      for (const node of [a, b]) expect((await fetch(`${node.url}/api/health`)).status).toBe(200);
    } finally {
      onA.destroy();
      first.destroy();
      onB?.destroy();
    }
  }, 600_000);
});
