/**
 * Access that follows the study live. A grant is decided at the upgrade; afterwards, whenever
 * something that grants were made from changes (a member removed, a role changed, a session ended,
 * a round changing phase…), `changed()` re-runs the RoomAuthorizer's decision for every matching
 * open connection on this node and publishes the change so every other node does the same. A
 * connection that lost read is closed (1008, a plain reason); one that lost write is downgraded.
 * Connections also never outlive their session: each is re-checked when its session expires.
 */
import { z } from 'zod';
import type { Relay, RelaySubscription, Recheck, RoomAuthorizer, RoomGrant } from './contracts.js';
import type { SyncLogger } from './logger.js';

/**
 * Which open connections to re-evaluate: those matching every field given. `{}` means all of them.
 * Room ids are document ids in any casing.
 */
export interface AccessChange {
  studyId?: string;
  userId?: string;
  roomIds?: readonly string[];
  sessionId?: string;
}

/** What route handlers and other services call after changing something grants depend on. */
export interface LiveAccess {
  /** Resolves once matching connections on this node are re-evaluated and the change is on its way to the others. */
  changed(change: AccessChange): Promise<void>;
}

/** An open connection as live access sees it (sync's Connection). */
export interface LiveConnection {
  readonly grant: RoomGrant;
  /** Applies a re-evaluated grant (may narrow write; the room stays the same). */
  regrant(grant: RoomGrant): void;
  /** Closes with `closeCode` (default 1008) and `reason`. */
  revoke(reason: string, closeCode?: number): void;
}

/** The side the sync endpoint uses. */
export interface ConnectionTracker {
  /** Take before authorizing an upgrade; pass to track(), which re-evaluates if anything changed meanwhile. */
  stamp(): number;
  /** Follows an open connection until the returned function is called (when it closes). */
  track(connection: LiveConnection, stamp: number): () => void;
}

export interface LiveAccessService extends LiveAccess, ConnectionTracker {
  /** Joins the relay's access channel (other nodes' changes) and starts the periodic re-check. */
  start(): Promise<void>;
  close(): Promise<void>;
  /** Connections followed on this node. */
  size(): number;
}

export interface LiveAccessOptions {
  authorizer: Pick<RoomAuthorizer, 'recheck'>;
  relay: Relay;
  logger: SyncLogger;
  /**
   * Re-check every connection this often (0: never). Catches what no event announced: a change
   * made by another process (the CLI), or a relay message lost while Redis reconnected.
   */
  sweepMs?: number;
  now?: () => number;
}

/** The relay channel of access changes. Rooms are uuids, so no room can take this name. */
export const ACCESS_CHANNEL = 'live-access';

/** Node's timers hold at most 2^31-1 ms (about 24.8 days); a later expiry is re-armed on the way. */
const MAX_TIMER_MS = 2 ** 31 - 1;
/** Fire a little after the expiry so the session check, on the same clock, sees it as past. */
const EXPIRY_GRACE_MS = 50;

const ChangeMessage = z.object({
  studyId: z.string().optional(),
  userId: z.string().optional(),
  roomIds: z.array(z.string()).optional(),
  sessionId: z.string().optional(),
});

interface Followed {
  /** Bumped by each re-check started: only the latest one's outcome is applied. */
  version: number;
  expiry: NodeJS.Timeout | null;
}

export function createLiveAccess(options: LiveAccessOptions): LiveAccessService {
  const { authorizer, relay, logger } = options;
  const now = options.now ?? Date.now;
  const followed = new Map<LiveConnection, Followed>();
  /** Counts re-evaluations started on this node, so an upgrade in flight can tell it missed one. */
  let changes = 0;
  let sweep: NodeJS.Timeout | null = null;
  let offReconnect: (() => void) | undefined;
  let subscription: RelaySubscription | null = null;

  function matches(grant: RoomGrant, change: AccessChange): boolean {
    if (change.studyId !== undefined && grant.studyId !== change.studyId.toLowerCase()) return false;
    if (change.userId !== undefined && grant.userId !== change.userId.toLowerCase()) return false;
    if (change.sessionId !== undefined && grant.sessionId !== change.sessionId) return false;
    if (change.roomIds !== undefined && !change.roomIds.some((id) => id.toLowerCase() === grant.room)) return false;
    return true;
  }

  function armExpiry(connection: LiveConnection, entry: Followed): void {
    if (entry.expiry !== null) clearTimeout(entry.expiry);
    const delay = Math.min(MAX_TIMER_MS, Math.max(0, connection.grant.sessionExpiresAt.getTime() - now()) + EXPIRY_GRACE_MS);
    entry.expiry = setTimeout(() => void recheckAll([connection]), delay);
    entry.expiry.unref();
  }

  function apply(connection: LiveConnection, outcome: Recheck): void {
    const entry = followed.get(connection);
    if (entry === undefined) return; // closed meanwhile
    if (!outcome.ok) {
      untrack(connection);
      connection.revoke(outcome.reason, outcome.closeCode);
      return;
    }
    if (outcome.grant.room !== connection.grant.room) return; // cannot happen: the decision is for the same document
    connection.regrant(outcome.grant);
    armExpiry(connection, entry);
  }

  /** Re-checks connections, once per session and room (several tabs share one decision). */
  async function recheckAll(connections: Iterable<LiveConnection>): Promise<void> {
    changes++;
    const groups = new Map<string, LiveConnection[]>();
    for (const connection of connections) {
      const key = `${connection.grant.sessionId}|${connection.grant.room}`;
      const group = groups.get(key);
      if (group) group.push(connection);
      else groups.set(key, [connection]);
    }
    await Promise.all(
      [...groups.values()].map(async (group) => {
        const versions = group.map((c) => {
          const entry = followed.get(c);
          return entry === undefined ? -1 : ++entry.version;
        });
        let outcome: Recheck;
        try {
          outcome = await authorizer.recheck(group[0]!.grant);
        } catch (error) {
          // Keep the connection as it is; the next change or sweep tries again.
          logger.error({ err: error, room: group[0]!.grant.room, userId: group[0]!.grant.userId }, 'access re-check failed');
          return;
        }
        group.forEach((connection, i) => {
          if (followed.get(connection)?.version === versions[i]) apply(connection, outcome);
        });
      }),
    );
  }

  function evaluate(change: AccessChange): Promise<void> {
    return recheckAll([...followed.keys()].filter((c) => matches(c.grant, change)));
  }

  function untrack(connection: LiveConnection): void {
    const entry = followed.get(connection);
    if (entry === undefined) return;
    if (entry.expiry !== null) clearTimeout(entry.expiry);
    followed.delete(connection);
  }

  function onRemote(payload: Uint8Array): void {
    let change: AccessChange;
    try {
      change = ChangeMessage.parse(JSON.parse(new TextDecoder().decode(payload)));
    } catch (error) {
      logger.warn({ err: error }, 'ignored an unreadable access change from the relay');
      return;
    }
    evaluate(change).catch((error: unknown) => logger.error({ err: error }, 'access re-evaluation failed'));
  }

  return {
    async changed(change) {
      const published = relay.publish(ACCESS_CHANNEL, new TextEncoder().encode(JSON.stringify(change))).catch((error: unknown) => {
        // The change itself is stored; other nodes pick it up at their next sweep.
        logger.error({ err: error, change }, 'could not relay an access change to other nodes');
      });
      await Promise.all([evaluate(change), published]);
    },

    stamp: () => changes,

    track(connection, stamp) {
      const entry: Followed = { version: 0, expiry: null };
      followed.set(connection, entry);
      armExpiry(connection, entry);
      // A change was evaluated between this connection's authorization and now: it was not yet followed.
      if (stamp !== changes) void recheckAll([connection]);
      return () => untrack(connection);
    },

    async start() {
      subscription = await relay.subscribe(ACCESS_CHANNEL, onRemote);
      // Whatever was published while the relay was away is lost: re-check everyone.
      offReconnect = relay.onReconnect?.(() => void evaluate({}));
      if (options.sweepMs !== undefined && options.sweepMs > 0) {
        sweep = setInterval(() => void evaluate({}), options.sweepMs);
        sweep.unref();
      }
    },

    async close() {
      if (sweep !== null) clearInterval(sweep);
      offReconnect?.();
      for (const connection of [...followed.keys()]) untrack(connection);
      await subscription?.unsubscribe().catch((error: unknown) => logger.warn({ err: error }, 'leaving the access channel failed'));
    },

    size: () => followed.size,
  };
}
