/**
 * Fan-out between nodes in one process: a hub, and a Relay per node joined to it. A message published
 * on one node reaches, in order and before `publish` resolves, every subscriber of its room on every
 * other node of the hub (never its own node, as with Redis); nothing is lost, so it is not lossy. One
 * node alone on its hub is noRelay (no-relay.ts). Subscriptions are per subscriber, as the Redis relay's:
 * leaving ends only one's own.
 */
import type { Relay, RelaySubscription } from '../sync/contracts.js';

type Subscribers = Map<string, Set<(payload: Uint8Array) => void>>;

export interface MemoryRelayHub {
  /** A new node on the hub. */
  node(): Relay;
}

export function createMemoryRelayHub(): MemoryRelayHub {
  const nodes = new Set<Subscribers>();
  return {
    node() {
      const rooms: Subscribers = new Map();
      nodes.add(rooms);
      return {
        async subscribe(room, onMessage): Promise<RelaySubscription> {
          // A wrapper of its own: the same handler subscribed twice is still two subscribers.
          const subscriber = (payload: Uint8Array) => onMessage(payload);
          let subscribers = rooms.get(room);
          if (subscribers === undefined) rooms.set(room, (subscribers = new Set()));
          subscribers.add(subscriber);
          return {
            async unsubscribe() {
              const current = rooms.get(room);
              if (current?.delete(subscriber) && current.size === 0) rooms.delete(room);
            },
          };
        },
        async publish(room, payload) {
          for (const other of nodes) {
            if (other === rooms) continue;
            // A copy each, as each would read its own from the network.
            for (const subscriber of [...(other.get(room) ?? [])]) subscriber(payload.slice());
          }
        },
        async close() {
          nodes.delete(rooms);
          rooms.clear();
        },
      };
    },
  };
}
