/**
 * The Redis relay against a real Redis (REDIS_URL; skipped when unset, fails when set but unreachable):
 * binary payloads arrive intact on other nodes, a node ignores its own messages, and a dropped
 * subscriber connection reports a reconnect (so rooms re-read the log). Redis pub/sub is
 * at-most-once and delivers to every subscriber of the channel (Redis docs, "Pub/Sub").
 */
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPrivateRedis, type PrivateRedis } from '../../../../test/support/private-services.js';
import { waitFor } from '../../../../test/support/wait.js';
import { createRedisRelay, RelayError, type RedisRelay } from './redis-relay.js';

const url = process.env.REDIS_URL;

describe('createRedisRelay', () => {
  it('rejects with a typed error when Redis cannot be reached', async () => {
    await expect(createRedisRelay('redis://127.0.0.1:1', { connectTimeoutMs: 500 })).rejects.toBeInstanceOf(RelayError);
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

  it('delivers binary payloads to other nodes only', async () => {
    const atOne: Uint8Array[] = [];
    const atTwo: Uint8Array[] = [];
    await one.subscribe(room, (p) => atOne.push(p.slice()));
    await two.subscribe(room, (p) => atTwo.push(p.slice()));
    const payload = new Uint8Array([0, 255, 13, 10, 0, 128]);
    await one.publish(room, payload);
    await two.publish(room, new Uint8Array([7]));
    await waitFor(() => atTwo.length === 1 && atOne.length === 1, 'one message each way');
    expect(atTwo[0]).toEqual(payload);
    expect(atOne[0]).toEqual(new Uint8Array([7]));
    await two.unsubscribe(room);
    await one.publish(room, new Uint8Array([1]));
    await one.publish(room, new Uint8Array([2])); // sent after the first: when it is seen nowhere, neither was the first
    await two.subscribe(room, (p) => atTwo.push(p.slice()));
    await one.publish(room, new Uint8Array([3]));
    await waitFor(() => atTwo.length === 2, 'message after resubscribe');
    expect(atTwo[1]).toEqual(new Uint8Array([3]));
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
    await two.subscribe('left', () => {});
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
      await two.unsubscribe('left');
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
