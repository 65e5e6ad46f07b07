/**
 * The sync endpoint: y-websocket protocol on `/sync/<room>` of an existing http.Server.
 * Authorizes at the upgrade, then hands each socket to a Connection in its Room.
 */
import type { Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { WebSocketServer, type WebSocket } from 'ws';
import * as Y from 'yjs';
import { Connection, DEFAULT_MAX_PRESENCE_BYTES, MEMOS_VIEW_CHANGED } from './connection.js';
import { CommitQueueBudget, ConnectionCounts, DEFAULT_BUDGETS, type SyncBudgets } from './budgets.js';
import { RoomError } from './room-state.js';
import { clientAddress } from '../auth/client-address.js';
import type { Relay, RoomAuthorizer, RoomGrant, UpdateStore } from './contracts.js';
import { AppCloseCode, CloseCode, SyncError } from './errors.js';
import type { ConnectionTracker } from './live-access.js';
import { consoleLogger, type SyncLogger } from './logger.js';
import { RoomRegistry } from './room-registry.js';
import { encodeRelayFrame } from './relay-frame.js';
import type { RoomPeer, RoomState } from './room.js';
import { refuse, roomFromUrl, statusOf, type IncomingMessage } from './upgrade.js';

/** A document's state as an update (whole, or since a state vector) and the state vector it brings a copy to. */
export interface DocState {
  update: Uint8Array;
  stateVector: Uint8Array;
}

export interface SyncOptions {
  authorizer: RoomAuthorizer;
  store: UpdateStore;
  relay: Relay;
  /** Larger messages close their connection with 1009. */
  maxMessageBytes: number;
  /** A larger presence state closes its connection with 1009 (default 64 KiB). */
  maxPresenceBytes?: number;
  /** A connection that has not answered the previous ping by the next one is terminated. */
  pingIntervalMs: number;
  /** How often an open room re-reads the log for updates the relay lost (default: 5 s for a lossy relay, else never). */
  catchUpIntervalMs?: number;
  logger?: SyncLogger;
  /** Follows open connections so access changes reach them (live-access.ts); absent: grants stay as decided at the upgrade. */
  liveAccess?: ConnectionTracker;
  /** False while the server is still starting (readiness.ts): upgrades are refused with 503 until then. */
  ready?: () => boolean;
  /** Resource budgets (budgets.ts); each one absent takes its default. */
  budgets?: Partial<SyncBudgets>;
  /** Proxies in front that append to X-Forwarded-For (the per-address limit's address, as sign-in's); default 0. */
  trustProxy?: number;
}

export interface SyncStats {
  connections: number;
  rooms: number;
  byState: Record<RoomState, number>;
  /** Updates (and their bytes) awaiting commit on this node, and connections whose reads are paused for it. */
  commitQueue: { queued: number; queuedBytes: number; pausedSenders: number };
}

export interface SyncHandle {
  /**
   * Writes a server-made change into a document as any edit is written: committed to the log, applied
   * to the open room here (its peers receive it) and relayed to other nodes. Rejects if not stored.
   */
  write(docId: string, update: Uint8Array, userId: string | null): Promise<void>;
  /**
   * Hands an update already committed to the log by someone else (an import's transaction, log
   * position `seq`) to the open room here (its peers receive it) and to other nodes' rooms.
   */
  announce(docId: string, seq: number, update: Uint8Array): Promise<void>;
  /**
   * The document's state as one update (everything committed, from the open room or loaded into one),
   * keeping the room open for `holdMs` afterwards: the opening request reads it and the page's sockets,
   * arriving right after, join a room that is already loaded instead of loading it again. With `since`
   * (a state vector the caller holds) the update is only what the document gained since; `stateVector`
   * is the document's, taken with the update.
   */
  state(docId: string, holdMs: number, since?: Uint8Array): Promise<DocState>;
  close(): Promise<void>;
  stats(): SyncStats;
}

export function attachSync(httpServer: Server, options: SyncOptions): SyncHandle {
  const logger = options.logger ?? consoleLogger;
  const budgets: SyncBudgets = { ...DEFAULT_BUDGETS, ...options.budgets };
  const commits = new CommitQueueBudget(budgets.maxCommitQueue, budgets.maxCommitQueueBytes);
  const registry = new RoomRegistry({
    store: options.store,
    relay: options.relay,
    logger,
    catchUpIntervalMs: options.catchUpIntervalMs ?? (options.relay.lossy ? 5_000 : 0),
    loadTimeoutMs: budgets.roomLoadTimeoutMs,
    unloadTimeoutMs: budgets.roomUnloadTimeoutMs,
    commits,
    maxLoadedDocuments: budgets.maxLoadedDocuments,
    roomIdleMs: budgets.roomIdleMs,
  });
  const perAddress = new ConnectionCounts(budgets.maxConnectionsPerAddress);
  const perUser = new ConnectionCounts(budgets.maxConnectionsPerUser);
  const connectionLimits = {
    maxPresenceBytes: options.maxPresenceBytes ?? DEFAULT_MAX_PRESENCE_BYTES,
    maxBacklogBytes: budgets.maxBacklogBytes,
    maxPendingBytes: budgets.maxPendingBytesPerConnection,
    maxMessagesPerSecond: budgets.maxMessagesPerSecond,
    messageBurst: budgets.messageBurst,
  };
  const wss = new WebSocketServer({ noServer: true, maxPayload: options.maxMessageBytes });
  const connections = new Set<Connection>();
  /** Leases that keep rooms open after an opening request read them (`state`), cleared on close. */
  const leases = new Set<() => void>();
  let closing = false;

  const onUpgrade = (req: IncomingMessage, socket: Duplex, head: Buffer): void => {
    socket.on('error', (error: NodeJS.ErrnoException) => {
      // A client that goes away mid-handshake (a closed tab, a navigation) resets the socket: expected, not news.
      const gone = error.code === 'ECONNRESET' || error.code === 'EPIPE';
      if (gone) logger.debug?.({ err: error }, 'socket error during upgrade');
      else logger.warn({ err: error }, 'socket error during upgrade');
    });
    upgrade(req, socket, head).catch((error: unknown) => {
      logger.error({ err: error }, 'sync upgrade failed');
      refuse(socket, 500);
    });
  };

  async function upgrade(req: IncomingMessage, socket: Duplex, head: Buffer): Promise<void> {
    const room = roomFromUrl(req.url);
    if (room === null) return refuse(socket, 404);
    if (closing || options.ready?.() === false) return refuse(socket, 503);
    // Counted from here (before the authorizer's awaits), so parallel upgrades cannot all pass.
    const address = clientAddress(req.socket.remoteAddress, headerOf(req, 'x-forwarded-for'), options.trustProxy ?? 0);
    if (!perAddress.tryAdd(address)) {
      logger.warn({ address, limit: budgets.maxConnectionsPerAddress }, 'sync connection refused: too many from one address (429)');
      return refuse(socket, 429);
    }
    let counted = true;
    const uncount = (): void => {
      if (counted) perAddress.remove(address);
      counted = false;
    };
    socket.once('close', uncount);
    try {
      await authorizeAndOpen(req, socket, head, room, uncount);
    } catch (error) {
      uncount();
      throw error;
    }
  }

  async function authorizeAndOpen(req: IncomingMessage, socket: Duplex, head: Buffer, room: string, uncountAddress: () => void): Promise<void> {
    const stamp = options.liveAccess?.stamp() ?? 0;
    let grant: RoomGrant;
    try {
      grant = await options.authorizer.authorize(req, room);
    } catch (error) {
      const status = statusOf(error);
      if (status === 500) logger.error({ err: error, room }, 'authorizer failed');
      // A room a purge replaced: an HTTP refusal would only make the client retry with its old copy,
      // so the upgrade completes and the socket closes at once with a code that says "discard it".
      if (status === 410 && !socket.destroyed) {
        const reason = error instanceof Error ? error.message.slice(0, 120) : 'replaced';
        wss.handleUpgrade(req, socket, head, (ws) => ws.close(AppCloseCode.replaced, reason));
        return;
      }
      return refuse(socket, status);
    }
    if (socket.destroyed) return;
    if (!perUser.tryAdd(grant.userId)) {
      logger.warn({ userId: grant.userId, room, limit: budgets.maxConnectionsPerUser }, 'sync connection refused: too many for one person (429)');
      return refuse(socket, 429);
    }
    let userCounted = true;
    socket.once('close', () => {
      if (userCounted) perUser.remove(grant.userId);
      userCounted = false;
      uncountAddress();
    });
    const claimedView = memosViewOf(req.url);
    wss.handleUpgrade(req, socket, head, (ws) => void open(ws, grant, stamp, claimedView));
  }

  async function open(ws: WebSocket, grant: RoomGrant, stamp: number, claimedView: string | null): Promise<void> {
    // A client names the memos view its local copy was filtered for: another view's copy is never synced.
    if (grant.memoView !== undefined && claimedView !== null && claimedView !== grant.memoView.key) {
      ws.close(AppCloseCode.viewChanged, MEMOS_VIEW_CHANGED);
      return;
    }
    const connection = new Connection(ws, grant, logger, connectionLimits, (c) => commits.forget(c));
    connections.add(connection);
    // Followed from now on, also while the room loads: a revoked connection then never starts.
    const untrack = options.liveAccess?.track(connection, stamp) ?? (() => {});
    let room;
    try {
      room = await registry.join(grant.room, grant.docId, connection);
    } catch (error) {
      connections.delete(connection);
      untrack();
      connection.stop();
      if (error instanceof RoomError && error.code !== 'load-failed') {
        // Busy, not broken: the client may try again later.
        logger.warn({ err: error, code: error.code, room: grant.room, userId: grant.userId }, error.message);
        ws.close(CloseCode.tryAgainLater, error.message.slice(0, 120));
      } else {
        logger.error({ err: error, room: grant.room }, 'room failed to load');
        ws.close(CloseCode.internalError, 'document could not be loaded');
      }
      return;
    }
    const leave = (): void => {
      untrack();
      connections.delete(connection);
      connection.stop();
      registry.leave(room, connection);
    };
    if (ws.readyState !== ws.OPEN) return leave();
    ws.once('close', leave);
    connection.start(room);
  }

  const keepalive = setInterval(() => {
    for (const connection of connections) connection.keepalive();
  }, options.pingIntervalMs);
  keepalive.unref();

  const offReconnect = options.relay.onReconnect?.(() => registry.relayReconnected());
  httpServer.on('upgrade', onUpgrade);

  return {
    async write(docId, update, userId) {
      let failure: SyncError | null = null;
      const peer: RoomPeer = {
        send: () => {},
        sendAwareness: () => {},
        fail: (error) => {
          failure = error;
        },
      };
      const room = await registry.join(docId, docId, peer);
      try {
        await room.submitUpdate(update, peer, userId);
      } finally {
        registry.leave(room, peer);
      }
      if (failure) throw failure;
    },
    async announce(docId, seq, update) {
      // Rooms are named by their document id (DEVELOPERS.md).
      const room = registry.ready(docId);
      if (room) return room.applyCommitted(seq, update);
      await options.relay.publish(docId, encodeRelayFrame({ kind: 'update', seq, data: update }));
    },
    async state(docId, holdMs, since) {
      const lease: RoomPeer = { send: () => {}, sendAwareness: () => {}, fail: () => {}, lease: true };
      const room = await registry.join(docId, docId, lease);
      const state: DocState = { update: Y.encodeStateAsUpdate(room.doc, since), stateVector: Y.encodeStateVector(room.doc) };
      const release = (): void => {
        clearTimeout(timer);
        leases.delete(release);
        registry.leave(room, lease);
      };
      const timer = setTimeout(release, closing ? 0 : holdMs);
      timer.unref();
      leases.add(release);
      return state;
    },
    async close() {
      closing = true;
      for (const release of [...leases]) release();
      clearInterval(keepalive);
      offReconnect?.();
      httpServer.off('upgrade', onUpgrade);
      for (const connection of connections) connection.ws.close(CloseCode.goingAway, 'server closing');
      await registry.closeAll();
      // Peers that did not finish the closing handshake by now are dropped.
      for (const connection of connections) connection.ws.terminate();
      await new Promise<void>((resolve) => wss.close(() => resolve()));
    },
    stats() {
      return { connections: connections.size, ...registry.stats(), commitQueue: commits.stats() };
    },
  };
}

/** The `memosView` query parameter of a sync URL (the view key the client's memos copy was made for), or null. */
function memosViewOf(url: string | undefined): string | null {
  const q = url?.indexOf('?') ?? -1;
  if (q < 0) return null;
  const value = new URLSearchParams(url!.slice(q + 1)).get('memosView');
  return value && /^[0-9a-f]{16}$/.test(value) ? value : null;
}

function headerOf(req: IncomingMessage, name: string): string | undefined {
  const value = req.headers[name];
  return Array.isArray(value) ? value[0] : value;
}

export { DEFAULT_BUDGETS, type SyncBudgets } from './budgets.js';
export type { Relay, RelaySubscription, RoomAuthorizer, RoomGrant, UpdateStore } from './contracts.js';
export { SyncError, CloseCode, AppCloseCode } from './errors.js';
export { createLiveAccess, ACCESS_CHANNEL, type AccessChange, type LiveAccess, type LiveAccessService } from './live-access.js';
export type { SyncLogger } from './logger.js';
