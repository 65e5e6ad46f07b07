/**
 * Issue 13 item 9, second fault: Redis dies mid-storm and comes back. Two real server processes share
 * one PostgreSQL database and a private redis-server (this test's own, on a free port: the shared one
 * on 6379 is never touched). While Redis is down the nodes keep committing; what they fail to publish
 * is recovered by every node from the log (the periodic catch-up, sync/README.md "Several nodes"), so
 * clients on the other node still receive it. Once Redis is back both nodes subscribe again and later
 * updates travel through it (counted by Redis itself). Needs DATABASE_URL (and REDIS_URL, which
 * marks a CI-like run: then this runs, never skips).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPrivateRedis, type PrivateRedis } from '../support/private-services.js';
import { seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';
import { waitFor } from '../support/wait.js';
import { tokensInDatabase } from './database-state.js';
import { converged, Ledger, openStorm, pause, tokensIn, writeToken, type StormClient } from './storm.js';

const enabled = Boolean(process.env.DATABASE_URL && process.env.REDIS_URL);
// A cold start of a node on a shared 2-core machine under heavy load has taken over 60 s.
const START_MS = 180_000;
const CLIENTS = 20;

/** Writes `rounds` tokens per client, pacing rounds so the servers see a stream rather than one burst. */
async function writeRounds(clients: StormClient[], seed: BasicSeed, ledger: Ledger, phase: string, rounds: number): Promise<string[]> {
  const tokens: string[] = [];
  for (let round = 0; round < rounds; round++) {
    for (const c of clients) {
      const token = `${phase}${c.index}-${round}`;
      writeToken(c, seed, token, ledger);
      tokens.push(token);
    }
    await pause(10);
  }
  return tokens;
}

const failedPublishes = (node: SpawnedServer<unknown>) => node.stderr.split('\n').filter((l) => l.includes('relay publish failed')).length;

describe.runIf(enabled)('Redis restarted mid-storm', () => {
  let redis: PrivateRedis;
  let a: SpawnedServer<BasicSeed>;
  let b: SpawnedServer<undefined>;

  beforeAll(async () => {
    redis = await startPrivateRedis();
    a = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, seed: seedBasic, env: { REDIS_URL: redis.url } });
    b = await spawnServer({ db: 'postgres', startTimeoutMs: START_MS, sameDatabaseAs: a, env: { REDIS_URL: redis.url } });
  }, 3 * START_MS);

  afterAll(async () => {
    await b?.stop();
    await a?.stop();
    await redis?.stop();
  });

  it('keeps committing without Redis, recovers the gap from the log, and relays again once Redis is back', async () => {
    const seed = a.seeded;
    const channel = `gloss:room:${seed.memosRoom}`;
    const ledger = new Ledger();
    const clients = await openStorm(a.url, (i) => (i % 2 === 0 ? a.url : b.url), seed, CLIENTS, ledger);
    const onA = clients.filter((c) => c.index % 2 === 0);
    const onB = clients.filter((c) => c.index % 2 === 1);
    const holdsAll = (group: StormClient[], tokens: string[]) => group.every((c) => {
      const held = tokensIn(c.doc);
      return tokens.every((t) => held.has(t));
    });
    try {
      await waitFor(() => clients.every((c) => c.provider.synced), 'all synced', 60_000);
      await waitFor(async () => (await redis.cli('pubsub', 'numsub', channel)).endsWith('2'), 'both nodes subscribed to the room', 30_000);

      const before = await writeRounds(clients, seed, ledger, 'up', 4);
      await waitFor(() => converged(clients, ledger), 'the first rounds reached everyone', 60_000);

      // Mid-storm: Redis dies; the clients keep writing.
      await redis.kill();
      const downAt = Date.now();
      const failedBefore = { a: failedPublishes(a), b: failedPublishes(b) };
      const gap = await writeRounds(clients, seed, ledger, 'gap', 4);
      const gapFromA = gap.filter((t) => ledger.written.get(t)! % 2 === 0);
      const gapFromB = gap.filter((t) => ledger.written.get(t)! % 2 === 1);
      // Each node applies an update to its room only after committing it, so its own clients hold it:
      // the gap is committed while Redis is down.
      await waitFor(() => holdsAll(onA, gapFromA) && holdsAll(onB, gapFromB), 'the gap committed on each node', 60_000);
      // Every publish of the gap failed (ioredis gives up a queued command after its retries), so
      // nothing of the gap can arrive later through Redis: only the log can carry it across.
      await waitFor(
        () => failedPublishes(a) - failedBefore.a >= gapFromA.length && failedPublishes(b) - failedBefore.b >= gapFromB.length,
        'each node logged a failed publish per gap update',
        60_000,
      );
      await waitFor(() => converged(clients, ledger), 'the gap reached the other node from the log, with Redis still down', 60_000);
      const gapRecoveredMs = Date.now() - downAt;
      const inLog = await tokensInDatabase(a.dbEnv.DATABASE_URL!, seed.memosRoom);
      for (const t of [...before, ...gap]) expect(inLog.tokens.has(t), t).toBe(true);

      // Redis back on the same port: both nodes resubscribe by themselves, and relaying resumes.
      await redis.start();
      const upAt = Date.now();
      await waitFor(async () => (await redis.cli('pubsub', 'numsub', channel)).endsWith('2'), 'both nodes subscribed again', 60_000);
      const after = await writeRounds(clients, seed, ledger, 'after', 4);
      await waitFor(() => converged(clients, ledger), 'the last rounds reached everyone', 60_000);
      const resumedMs = Date.now() - upAt;
      // A restarted redis-server counts from zero: every update after the restart went through it.
      const stats = await redis.cli('info', 'commandstats');
      const publishes = Number(/cmdstat_publish:calls=(\d+)/.exec(stats)?.[1] ?? 0);
      expect(publishes).toBeGreaterThanOrEqual(after.length);

      for (const c of clients) c.destroy();
      const final = await tokensInDatabase(a.dbEnv.DATABASE_URL!, seed.memosRoom);
      expect(final.tokens.size).toBe(ledger.written.size);
      for (const t of ledger.written.keys()) expect(final.tokens.has(t), t).toBe(true);
      for (const node of [a, b]) expect((await fetch(`${node.url}/api/health`)).status).toBe(200);
      console.log(
        JSON.stringify({
          fault: 'Redis restarted mid-storm',
          clients: CLIENTS,
          written: ledger.written.size,
          beforeOutage: before.length,
          gap: gap.length,
          failedPublishes: { a: failedPublishes(a) - failedBefore.a, b: failedPublishes(b) - failedBefore.b },
          gapRecoveredFromLogMsAfterRedisDied: gapRecoveredMs,
          afterRestart: after.length,
          publishesThroughRestartedRedis: publishes,
          convergeMsAfterRedisBack: resumedMs,
          deliveries: ledger.deliveries,
          reconnections: clients.reduce((n, c) => n + c.connects - 1, 0),
          finalInLog: final.tokens.size,
        }),
      );
    } finally {
      for (const c of clients) c.destroy();
    }
  }, 600_000);
});
