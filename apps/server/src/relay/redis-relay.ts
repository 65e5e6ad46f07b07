/**
 * Fan-out across nodes through Redis pub/sub, one channel per room, binary payloads.
 * Each message starts with the sending node's id so a node ignores its own echoes.
 * Redis pub/sub is at-most-once: whatever it loses, rooms recover from the PostgreSQL log.
 */
import { randomBytes } from 'node:crypto';
import { Redis, ReplyError } from 'ioredis';
import type { Relay, RelaySubscription } from '../sync/contracts.js';

const NODE_ID_BYTES = 8;
const CHANNEL_PREFIX = 'gloss:room:';

export class RelayError extends Error {
  readonly code = 'relay-unavailable';
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'RelayError';
  }
}

export interface RedisRelay extends Relay {
  readonly nodeId: string;
  onReconnect(listener: () => void): () => void;
}

export interface RedisRelayOptions {
  /** Fail the first connection attempt after this long instead of retrying forever (default 5 s). */
  connectTimeoutMs?: number;
}

/** Connects a publisher and a subscriber; rejects with RelayError when Redis cannot be reached. */
export async function createRedisRelay(redisUrl: string, options: RedisRelayOptions = {}): Promise<RedisRelay> {
  const nodeId = randomBytes(NODE_ID_BYTES);
  const connectTimeout = options.connectTimeoutMs ?? 5_000;
  const redisOptions = { lazyConnect: true, connectTimeout, maxRetriesPerRequest: 3 };
  // Named so operators (and tests) can tell the connections apart in CLIENT LIST.
  const pub = new Redis(redisUrl, { ...redisOptions, connectionName: `gloss-pub-${nodeId.toString('hex')}` });
  // The subscriber keeps no queue of its own: while Redis is away a subscribe or unsubscribe is not
  // sent at all (it would wait in ioredis's offline queue, and a room's load or unload with it), and
  // each reconnect subscribes exactly the channels wanted then (`wanted`), before telling listeners.
  const sub = new Redis(redisUrl, {
    ...redisOptions,
    connectionName: `gloss-sub-${nodeId.toString('hex')}`,
    enableOfflineQueue: false,
    autoResubscribe: false,
    autoResendUnfulfilledCommands: false,
  });
  for (const client of [pub, sub]) client.on('error', () => {}); // reconnects by itself; failures surface as rejections
  try {
    await Promise.all([pub.connect(), sub.connect()]);
  } catch (cause) {
    pub.disconnect();
    sub.disconnect();
    throw new RelayError(`cannot reach Redis at ${redactUrl(redisUrl)}`, { cause });
  }

  /**
   * The channels this node wants, each with its subscribers: subscribed now, or at the next reconnect.
   * A channel stays subscribed in Redis while it has any subscriber here (several rooms of one name may
   * hold it: a room whose load outlived its timeout, and the newer room), and is unsubscribed when the last leaves.
   */
  const wanted = new Map<string, Set<(payload: Uint8Array) => void>>();
  const reconnectListeners = new Set<() => void>();
  // Resolved when the subscriber connection closes: a command sent on it may then never be answered
  // (unanswered commands are not resent), so nothing waits for one past that.
  let lost = deferred();
  sub.on('close', () => {
    lost.resolve();
    lost = deferred();
  });
  /** Sends a (un)subscribe if connected; resolves when Redis answered it or the connection is gone. */
  const whileConnected = async (send: () => Promise<unknown>): Promise<boolean> => {
    if (sub.status !== 'ready') return false;
    const gone = lost.promise.then(() => false);
    const answered = send().then(
      () => true,
      (error: unknown) => {
        if (error instanceof ReplyError) throw error; // Redis itself refused it
        return false; // the connection went away (or was going): the next reconnect puts things right
      },
    );
    return Promise.race([answered, gone]);
  };
  // Registered after the first connect, so every 'ready' here is a reconnect: a fresh connection with
  // no subscriptions. Whatever was published meanwhile is gone, so listeners (rooms) re-read the log,
  // once the wanted channels are subscribed again (a read before that could miss a later publish).
  sub.on('ready', () => {
    const channels = [...wanted.keys()];
    const renewed = channels.length === 0 ? Promise.resolve(true) : whileConnected(() => sub.subscribe(...channels));
    renewed.then(
      (ok) => {
        if (ok) for (const listener of reconnectListeners) listener();
        // else lost again before Redis answered: the next 'ready' renews them.
      },
      () => {}, // refused while connected: nothing to do but wait for the next reconnect
    );
  });

  sub.on('messageBuffer', (channel: Buffer, message: Buffer) => {
    if (message.length < NODE_ID_BYTES || message.subarray(0, NODE_ID_BYTES).equals(nodeId)) return;
    const subscribers = wanted.get(channel.toString('utf8'));
    if (subscribers === undefined) return;
    const payload = new Uint8Array(message.buffer, message.byteOffset + NODE_ID_BYTES, message.length - NODE_ID_BYTES);
    for (const subscriber of [...subscribers]) subscriber(payload);
  });

  return {
    nodeId: nodeId.toString('hex'),
    lossy: true,
    async subscribe(room, onMessage): Promise<RelaySubscription> {
      const channel = CHANNEL_PREFIX + room;
      // A wrapper of its own: the same handler subscribed twice is still two subscribers.
      const subscriber = (payload: Uint8Array) => onMessage(payload);
      let subscribers = wanted.get(channel);
      if (subscribers === undefined) wanted.set(channel, (subscribers = new Set()));
      subscribers.add(subscriber);
      /** Takes this subscriber out; true when it was the channel's last. */
      const remove = (): boolean => {
        const current = wanted.get(channel);
        if (!current?.delete(subscriber) || current.size > 0) return false;
        wanted.delete(channel);
        return true;
      };
      // Sent for every subscriber, also when the channel is subscribed already (SUBSCRIBE is idempotent):
      // its answer follows any earlier (un)subscribe of the channel, so this resolves once it is active.
      try {
        await whileConnected(() => sub.subscribe(channel));
      } catch (error) {
        remove();
        throw error;
      }
      return {
        async unsubscribe() {
          if (remove()) await whileConnected(() => sub.unsubscribe(channel));
        },
      };
    },
    async publish(room, payload) {
      await pub.publish(CHANNEL_PREFIX + room, Buffer.concat([nodeId, payload]));
    },
    onReconnect(listener) {
      reconnectListeners.add(listener);
      return () => reconnectListeners.delete(listener);
    },
    async close() {
      wanted.clear();
      // QUIT needs a live connection here (no offline queue): a subscriber waiting to reconnect just stops.
      const quitSub = sub.status === 'ready' ? sub.quit() : Promise.resolve(sub.disconnect());
      await Promise.allSettled([pub.quit(), quitSub]);
    },
  };
}

function deferred(): { promise: Promise<void>; resolve: () => void } {
  let resolve!: () => void;
  const promise = new Promise<void>((r) => (resolve = r));
  return { promise, resolve };
}

function redactUrl(url: string): string {
  return url.replace(/\/\/[^@/]*@/, '//***@');
}
