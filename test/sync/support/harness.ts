/**
 * In-process sync server for tests: a plain http.Server with attachSync, a test authorizer and
 * stock y-websocket 3.1 clients. The authorizer reads `?as=<role>` (observer = read-only) and
 * refuses rooms it does not know with 404, `?deny=1` with 403.
 */
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { attachSync, type SyncHandle, type SyncOptions } from '../../../apps/server/src/sync/index.js';
import type { Relay, Role, RoomAuthorizer, UpdateStore } from '../../../apps/server/src/sync/contracts.js';
import { noRelay } from '../../../apps/server/src/relay/index.js';
import { waitFor } from '../../support/wait.js';

export class TestHttpError extends Error {
  constructor(readonly status: number) {
    super(`HTTP ${status}`);
  }
}

/** Room name -> doc id; the room name is the doc id unless mapped. */
export function testAuthorizer(rooms: Map<string, string> | Set<string>, userId: string): RoomAuthorizer {
  return {
    async authorize(req, room) {
      const params = new URL(req.url ?? '/', 'http://x').searchParams;
      if (params.get('deny') === '1') throw new TestHttpError(403);
      const docId = rooms instanceof Map ? rooms.get(room) : rooms.has(room) ? room : undefined;
      if (docId === undefined) throw new TestHttpError(404);
      const role = (params.get('as') ?? 'coder') as Role;
      // `?user=` speaks as another person (presence ownership tests); default: the one test user
      const who = params.get('user') ?? userId;
      const far = new Date(Date.now() + 86_400_000);
      return { room, docId, studyId: 'study', kind: 'text', userId: who, userName: 'Test coder', sessionId: 'session', sessionExpiresAt: far, role, canWrite: role !== 'observer' };
    },
    // Grants here never change after the upgrade.
    recheck: async (grant) => ({ ok: true, grant }),
  };
}

export interface TestServer {
  url: string;
  port: number;
  http: Server;
  sync: SyncHandle;
  close(): Promise<void>;
}

export async function startSyncServer(options: {
  store: UpdateStore;
  authorizer: RoomAuthorizer;
  relay?: Relay;
  maxMessageBytes?: number;
  maxPresenceBytes?: number;
  pingIntervalMs?: number;
  catchUpIntervalMs?: number;
  logger?: SyncOptions['logger'];
  budgets?: SyncOptions['budgets'];
}): Promise<TestServer> {
  const http = createServer((_req, res) => res.writeHead(404).end());
  const sync = attachSync(http, {
    store: options.store,
    authorizer: options.authorizer,
    relay: options.relay ?? noRelay(),
    maxMessageBytes: options.maxMessageBytes ?? 1024 * 1024,
    ...(options.maxPresenceBytes !== undefined ? { maxPresenceBytes: options.maxPresenceBytes } : {}),
    pingIntervalMs: options.pingIntervalMs ?? 30_000,
    catchUpIntervalMs: options.catchUpIntervalMs,
    logger: options.logger ?? quietLogger,
    ...(options.budgets ? { budgets: options.budgets } : {}),
  });
  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  const port = (http.address() as AddressInfo).port;
  return {
    url: `ws://127.0.0.1:${port}/sync`,
    port,
    http,
    sync,
    async close() {
      await sync.close();
      http.closeAllConnections();
      await new Promise<void>((resolve) => http.close(() => resolve()));
    },
  };
}

export const quietLogger = { warn: () => {}, error: () => {} };

/** A stock y-websocket client. */
export function connectClient(url: string, room: string, params: Record<string, string> = {}, doc = new Y.Doc()) {
  const provider = new WebsocketProvider(url, room, doc, {
    WebSocketPolyfill: WebSocket as never,
    disableBc: true,
    params,
    maxBackoffTime: 200,
  });
  return { doc, provider, destroy: () => provider.destroy() };
}

export { waitFor };

export const synced = (provider: WebsocketProvider) => waitFor(() => provider.synced, 'provider synced');
