/**
 * Composition: database (migrated) → sessions, authorizer, update store, relay → hono app on
 * @hono/node-server → sync on the http.Server's `upgrade` event. close() undoes it in reverse:
 * stop accepting, close sockets (rooms flush), flush and close the store, relay, database.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { serve } from '@hono/node-server';
import { openDatabase, type Database } from '@gloss/db';
import { createRoomAuthorizer } from './access/authorizer.js';
import { createFirstRun, type FirstRun } from './auth/first-run.js';
import { createRateLimiter } from './auth/rate-limit.js';
import { createSessionService } from './auth/sessions.js';
import type { ServerConfig } from './config.js';
import { createCommentEvents } from './comments/events.js';
import { buildApp } from './http/app.js';
import { createLogger, type Logger } from './logger.js';
import { createRedisRelay, noRelay } from './relay/index.js';
import { createProjector, scheduleCatchUp, withProjection } from './projection/index.js';
import { createPgUpdateStore } from './store/index.js';
import { attachSync, createLiveAccess } from './sync/index.js';
import { createStudyEvents } from './exchange/study-events.js';
import type { Relay } from './sync/contracts.js';
import type { DocWriter } from './rounds/doc-change.js';

export interface RunningServer {
  url: string;
  port: number;
  database: Database;
  db: Database['db'];
  /** The set-up code and whether the database still waits for its first account (print it then). */
  firstRun: FirstRun;
  close(): Promise<void>;
}

const SESSION_SWEEP_MS = 60 * 60 * 1000;

export async function startServer(config: ServerConfig, logger: Logger = createLogger(config.logLevel)): Promise<RunningServer> {
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  const cleanups: Array<() => Promise<unknown>> = [() => database.close()];
  const undo = async () => {
    for (const fn of cleanups.reverse()) await fn().catch((err: unknown) => logger.error({ err }, 'shutdown step failed'));
  };
  try {
    const sessions = createSessionService(database.db, config.sessionMs);
    const relay: Relay = config.redisUrl ? await createRedisRelay(config.redisUrl) : noRelay();
    cleanups.push(() => relay.close());
    const logStore = createPgUpdateStore(database, {
      onCompactionError: (err, docId) => logger.error({ err, docId }, 'compaction failed'),
    });
    // Segments, codes and memos follow each committed change into relational tables (projection/).
    const projector = createProjector({ db: database.db, store: logStore, onError: (err, docId) => logger.error({ err, docId }, 'projection failed') });
    const store = withProjection(logStore, projector);
    scheduleCatchUp(database.db, projector).catch((err: unknown) => logger.warn({ err }, 'projection catch-up could not start'));
    cleanups.push(() => store.close());

    const firstRun = createFirstRun(database.db);
    const authorizer = createRoomAuthorizer({ db: database.db, sessions, publicUrl: config.publicUrl });
    // Before the app: routes that change members, roles or sessions re-check open connections through it.
    const liveAccess = createLiveAccess({ authorizer, relay, logger, sweepMs: config.accessRecheckMs });
    await liveAccess.start();
    cleanups.push(() => liveAccess.close());

    let syncStats: () => Record<string, unknown> = () => ({});
    // Server-made document changes go through the sync layer, which is attached after the app.
    let syncDocs: DocWriter | null = null;
    const docs: DocWriter = {
      write: (docId, update, userId) => (syncDocs ? syncDocs.write(docId, update, userId) : Promise.reject(new Error('sync is not attached yet'))),
      announce: (docId, seq, update) => (syncDocs ? syncDocs.announce(docId, seq, update) : Promise.reject(new Error('sync is not attached yet'))),
    };
    const app = buildApp(
      {
        db: database.db,
        dbKind: database.kind,
        store,
        projector,
        docs,
        sessions,
        liveAccess,
        signInLimiter: createRateLimiter(config.signInMaxFailures, config.signInWindowMs),
        config,
        commentEvents: createCommentEvents(relay, (err) => logger.warn({ err }, 'unreadable comment event from the relay')),
        logger,
        studyEvents: createStudyEvents(relay, (err) => logger.warn({ err }, 'unreadable study event from the relay')),
        health: () => ({ sync: syncStats() }),
        firstRun,
      },
      (err) => logger.error({ err }, 'request failed'),
    );

    const server = serve({ fetch: app.fetch, port: config.port, hostname: config.host }) as Server;
    await new Promise<void>((resolve, reject) => {
      server.once('listening', resolve);
      server.once('error', reject);
    });
    cleanups.push(() => closeHttp(server));

    const sync = attachSync(server, {
      authorizer,
      store,
      relay,
      liveAccess,
      maxMessageBytes: config.maxMessageBytes,
      maxPresenceBytes: config.maxPresenceBytes,
      pingIntervalMs: config.pingIntervalMs,
      logger,
    });
    cleanups.push(() => sync.close());
    syncStats = () => ({ ...sync.stats() });
    syncDocs = sync;

    const sweep = setInterval(() => {
      sessions.deleteExpired().catch((err: unknown) => logger.warn({ err }, 'expired-session sweep failed'));
    }, SESSION_SWEEP_MS);
    sweep.unref();
    cleanups.push(async () => clearInterval(sweep));

    const port = (server.address() as AddressInfo).port;
    const host = config.host === '0.0.0.0' || config.host === '::' ? 'localhost' : config.host.includes(':') ? `[${config.host}]` : config.host;
    let closing: Promise<void> | undefined;
    return {
      url: `http://${host}:${port}`,
      port,
      database,
      db: database.db,
      firstRun,
      close: () => (closing ??= undo()),
    };
  } catch (err) {
    await undo();
    throw err;
  }
}

/** Stops accepting, then ends idle keep-alive sockets so close() does not wait for clients to hang up. */
function closeHttp(server: Server): Promise<void> {
  return new Promise((resolve) => {
    server.close(() => resolve());
    server.closeIdleConnections();
  });
}

export { loadConfig, type ServerConfig } from './config.js';
