/**
 * The Redis relay against a real Redis (REDIS_URL; skipped when unset, fails when set but unreachable):
 * the relay conformance suite (conformance-suite.ts, as the in-memory relay), a dropped subscriber
 * connection reports a reconnect (so rooms re-read the log), the node holds a channel in Redis while any
 * subscriber of it is left, and (un)subscribing never waits for a Redis that is down. Redis pub/sub is
 * at-most-once and delivers to every subscriber of the channel (Redis docs, "Pub/Sub").
 */
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPrivateRedis, type PrivateRedis } from '../../../../test/support/private-services.js';
import { waitFor } from '../../../../test/support/wait.js';
import { relayConformance } from './conformance-suite.js';
import { createRedisRelay, RelayError, type RedisRelay } from './redis-relay.js';

const url = process.env.REDIS_URL;

describe('createRedisRelay', () => {
  it('rejects with a typed error when Redis cannot be reached', async () => {
    await expect(createRedisRelay('redis://127.0.0.1:1', { connectTimeoutMs: 500 })).rejects.toBeInstanceOf(RelayError);
  });
});

describe.runIf(url)('Redis relay', () => {
  relayConformance('Redis relay', async () => {
    const one = await createRedisRelay(url!);
    const two = await createRedisRelay(url!);
    return { one, two, close: async () => void (await Promise.all([one.close(), two.close()])) };
  });
});

describe.runIf(url)('Redis relay between two nodes', () => {
  let one: RedisRelay;
  let two: RedisRelay;
  const room = `relay-test-${Date.now()}`;

  beforeAll(async () => {
    one = await createRedisRelay(url!);
    two = await createRedisRelay(url!);
  });
  afterAll(async () => {
    await one?.close();
    await two?.close();
  });

  it('holds a channel in Redis while any subscriber of it is left on the node, and leaves it with the last', async () => {
    const admin = new Redis(url!);
    const channel = `gloss:room:${room}-held`;
    // PUBSUB NUMSUB counts connections subscribed to the channel: this node's subscriber is one.
    const numsub = async () => Number(((await admin.pubsub('NUMSUB', channel)) as [string, number])[1]);
    try {
      const first = await two.subscribe(`${room}-held`, () => {});
      const second = await two.subscribe(`${room}-held`, () => {});
      expect(await numsub()).toBe(1);
      await first.unsubscribe();
      expect(await numsub()).toBe(1);
      await second.unsubscribe();
      expect(await numsub()).toBe(0);
    } finally {
      admin.disconnect();
    }
  });

  it('reports a reconnect after the subscriber connection is dropped', async () => {
    let reconnects = 0;
    const off = two.onReconnect(() => reconnects++);
    const admin = new Redis(url!);
    try {
      // Only this node's subscriber: the Redis is shared with other suites.
      const list = (await admin.client('LIST')) as string;
      const line = list.split('\n').find((l) => l.includes(`name=gloss-sub-${two.nodeId}`));
      const id = /(?:^|\s)id=(\d+)/.exec(line ?? '')?.[1];
      expect(id).toBeDefined();
      await admin.client('KILL', 'ID', id!);
      await waitFor(() => reconnects > 0, 'reconnect reported');
      // And the subscription came back: messages flow again.
      const got: Uint8Array[] = [];
      await two.subscribe(`${room}-2`, (p) => got.push(p));
      await one.publish(`${room}-2`, new Uint8Array([9]));
      await waitFor(() => got.length === 1, 'message after reconnect');
    } finally {
      off();
      admin.disconnect();
    }
  });
});

// A Redis of its own (redis-server on a free port) so it can be stopped: the shared one is never touched.
describe.runIf(url)('Redis relay while Redis is down', () => {
  let redis: PrivateRedis;
  let one: RedisRelay;
  let two: RedisRelay;

  beforeAll(async () => {
    redis = await startPrivateRedis();
    one = await createRedisRelay(redis.url);
    two = await createRedisRelay(redis.url);
  });
  afterAll(async () => {
    await one?.close();
    await two?.close();
    await redis?.stop();
  });

  it('subscribes and unsubscribes without waiting for Redis, and renews exactly the wanted channels before reporting the reconnect', async () => {
    const numsub = async (room: string) => Number((await redis.cli('pubsub', 'numsub', `gloss:room:${room}`)).split('\n').at(-1));
    const got: number[] = [];
    const left = await two.subscribe('left', () => {});
    await waitFor(async () => (await numsub('left')) === 1, 'subscribed before the outage');
    let reconnects = 0;
    let seenAtReconnect: Promise<[number, number]> | null = null;
    const off = two.onReconnect(() => {
      reconnects++;
      seenAtReconnect ??= Promise.all([numsub('joined'), numsub('left')]);
    });
    try {
      await redis.kill();
      // Each resolves with Redis down (before: queued in ioredis's offline queue, then refused after its retries).
      await left.unsubscribe();
      await two.subscribe('joined', (p) => got.push(p[0]!));
      await redis.start();
      await waitFor(() => reconnects > 0, 'reconnect reported');
      // Listeners are told once the wanted channel is subscribed again, and the one left meanwhile is not.
      expect(await seenAtReconnect).toEqual([1, 0]);
      await one.publish('joined', new Uint8Array([5]));
      await waitFor(() => got.length === 1, 'message through the renewed subscription');
      expect(got).toEqual([5]);
    } finally {
      off();
    }
  });
});
