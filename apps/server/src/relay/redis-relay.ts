/**
 * Fan-out across nodes through Redis pub/sub, one channel per room, binary payloads.
 * Each message starts with the sending node's id so a node ignores its own echoes.
 * Redis pub/sub is at-most-once: whatever it loses, rooms recover from the PostgreSQL log.
 */
import { randomBytes } from 'node:crypto';
import { Redis } from 'ioredis';
import type { Relay } from '../sync/contracts.js';

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
  const sub = new Redis(redisUrl, { ...redisOptions, connectionName: `gloss-sub-${nodeId.toString('hex')}` });
  for (const client of [pub, sub]) client.on('error', () => {}); // reconnects by itself; failures surface as rejections
  try {
    await Promise.all([pub.connect(), sub.connect()]);
  } catch (cause) {
    pub.disconnect();
    sub.disconnect();
    throw new RelayError(`cannot reach Redis at ${redactUrl(redisUrl)}`, { cause });
  }

  const handlers = new Map<string, (payload: Uint8Array) => void>();
  const reconnectListeners = new Set<() => void>();
  // Registered after the first connect, so every 'ready' here is a reconnect. ioredis resubscribes by
  // itself, but whatever was published meanwhile is gone: rooms re-read the log.
  sub.on('ready', () => {
    for (const listener of reconnectListeners) listener();
  });

  sub.on('messageBuffer', (channel: Buffer, message: Buffer) => {
    if (message.length < NODE_ID_BYTES || message.subarray(0, NODE_ID_BYTES).equals(nodeId)) return;
    const handler = handlers.get(channel.toString('utf8'));
    handler?.(new Uint8Array(message.buffer, message.byteOffset + NODE_ID_BYTES, message.length - NODE_ID_BYTES));
  });

  return {
    nodeId: nodeId.toString('hex'),
    lossy: true,
    async subscribe(room, onMessage) {
      const channel = CHANNEL_PREFIX + room;
      handlers.set(channel, onMessage);
      await sub.subscribe(channel);
    },
    async unsubscribe(room) {
      const channel = CHANNEL_PREFIX + room;
      handlers.delete(channel);
      await sub.unsubscribe(channel);
    },
    async publish(room, payload) {
      await pub.publish(CHANNEL_PREFIX + room, Buffer.concat([nodeId, payload]));
    },
    onReconnect(listener) {
      reconnectListeners.add(listener);
      return () => reconnectListeners.delete(listener);
    },
    async close() {
      handlers.clear();
      await Promise.allSettled([pub.quit(), sub.quit()]);
    },
  };
}

function redactUrl(url: string): string {
  return url.replace(/\/\/[^@/]*@/, '//***@');
}
