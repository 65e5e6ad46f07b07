/**
 * Composition: database (migrated) → sessions, authorizer, update store, relay → hono app on
 * @hono/node-server → sync on the http.Server's `upgrade` event. close() undoes it in reverse:
 * stop accepting, close sockets (rooms flush), flush and close the store, relay, database.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { serve } from '@hono/node-server';
import { openDatabase, type Database, type Db } from '@gloss/db';
import { createRoomAuthorizer } from './access/authorizer.js';
import { createTicketBook } from './access/tickets.js';
import { createFirstRun, type FirstRun } from './auth/first-run.js';
import { createRateLimiter } from './auth/rate-limit.js';
import { createSessionService } from './auth/sessions.js';
import { warmVerifyTime } from './auth/passwords.js';
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
import { createReadiness } from './readiness.js';
import { createHeavyPool } from './heavy/pool.js';
import { createHeavyLimits } from './heavy/limits.js';

export interface RunningServer {
  url: string;
  port: number;
  database: Database;
  db: Database['db'];
  /** The set-up code and whether the database still waits for its first account (print it then). */
  firstRun: FirstRun;
  close(): Promise<void>;
}

export interface StartOptions {
  /**
   * A start-up step run once the server listens and before it counts as ready (seeding the demo):
   * meanwhile /api/health answers 503 naming `what`, and the rest of the API and sync answer 503.
   */
  prepare?: { what: string; run(db: Db, url: string): Promise<void> };
}

const SESSION_SWEEP_MS = 60 * 60 * 1000;

/** Resolves once the server is ready: listening, sync attached, `options.prepare` done. */
export async function startServer(
  config: ServerConfig,
  logger: Logger = createLogger(config.logLevel),
  options: StartOptions = {},
): Promise<RunningServer> {
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  const cleanups: Array<() => Promise<unknown>> = [() => database.close()];
  const undo = async () => {
    for (const fn of cleanups.reverse()) await fn().catch((err: unknown) => logger.error({ err }, 'shutdown step failed'));
  };
  try {
    const sessions = createSessionService(database.db, config.sessionMs);
    await warmVerifyTime();
    const relay: Relay = config.redisUrl ? await createRedisRelay(config.redisUrl) : noRelay();
    cleanups.push(() => relay.close());
    const logStore = createPgUpdateStore(database, {
      onCompactionError: (err, docId) => logger.error({ err, docId }, 'compaction failed'),
    });
    // Segments, codes and memos follow each committed change into relational tables (projection/).
    const projector = createProjector({ db: database.db, store: logStore, onError: (err, docId) => logger.error({ err, docId }, 'projection failed') });
    const store = withProjection(logStore, projector);
    cleanups.push(() => store.close());

    const firstRun = createFirstRun(database.db);
    // Tickets stand while live access has evaluated no change since their decisions (tickets.ts).
    const tickets = createTicketBook({ stamp: () => liveAccess.stamp() });
    const authorizer = createRoomAuthorizer({ db: database.db, sessions, publicUrl: config.publicUrl, tickets });
    // Before the app: routes that change members, roles or sessions re-check open connections through it.
    const liveAccess = createLiveAccess({ authorizer, relay, logger, sweepMs: config.accessRecheckMs });
    await liveAccess.start();
    cleanups.push(() => liveAccess.close());

    // Reports with bootstrap, file reading and project exports run in worker threads (heavy/).
    const heavy = createHeavyPool({ threads: config.heavyThreads, timeoutMs: config.heavyTimeoutMs, memoryMb: config.heavyMemoryMb, maxQueue: config.heavyQueue, logger });
    cleanups.push(() => heavy.close());

    const readiness = createReadiness();
    const syncAttached = readiness.wait('sync starting');
    const prepared = options.prepare ? readiness.wait(options.prepare.what) : () => undefined;
    let syncStats: () => Record<string, unknown> = () => ({});
    // Server-made document changes go through the sync layer, which is attached after the app.
    let syncDocs: DocWriter | null = null;
    const docs: DocWriter = {
      write: (docId, update, userId) => (syncDocs ? syncDocs.write(docId, update, userId) : Promise.reject(new Error('sync is not attached yet'))),
      announce: (docId, seq, update) => (syncDocs ? syncDocs.announce(docId, seq, update) : Promise.reject(new Error('sync is not attached yet'))),
      state: (docId, holdMs, since) => (syncDocs ? syncDocs.state(docId, holdMs, since) : Promise.reject(new Error('sync is not attached yet'))),
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
        authorizer,
        tickets,
        signInLimiter: createRateLimiter({
          windowMs: config.signInWindowMs,
          maxKeys: config.signInTrackedKeys,
          onBusy: () => logger.warn({ trackedKeys: config.signInTrackedKeys }, 'sign-in limiter full: refusing attempts on new keys'),
        }),
        config,
        commentEvents: createCommentEvents(relay, (err) => logger.warn({ err }, 'unreadable comment event from the relay')),
        logger,
        studyEvents: createStudyEvents(relay, (err) => logger.warn({ err }, 'unreadable study event from the relay')),
        health: () => ({ sync: syncStats(), heavy: heavy.stats() }),
        heavy,
        heavyLimits: createHeavyLimits({ perMinute: config.heavyPerMinute, atOnce: config.heavyAtOnce }),
        readiness,
        firstRun,
      },
      (err) => logger.error({ err }, 'request failed'),
    );

    const server = serve({ fetch: app.fetch, port: config.port, hostname: config.host }) as Server;
    // Node closes an idle kept-alive socket after 5 s, and a client that picks that socket for its next
    // request in the same instant gets a reset instead of an answer (seen on a loaded machine in tests).
    // A long idle window, longer than a reverse proxy's (nginx keeps upstream sockets 60 s), makes that
    // race rare for browsers, scripts and proxies alike; headersTimeout must exceed it.
    server.keepAliveTimeout = 65_000;
    server.headersTimeout = 66_000;
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
      ready: readiness.ready,
      budgets: config.syncBudgets,
      trustProxy: config.trustProxy,
    });
    cleanups.push(() => sync.close());
    syncStats = () => ({ ...sync.stats() });
    syncDocs = sync;
    syncAttached();

    const port = (server.address() as AddressInfo).port;
    const host = config.host === '0.0.0.0' || config.host === '::' ? 'localhost' : config.host.includes(':') ? `[${config.host}]` : config.host;
    const url = `http://${host}:${port}`;
    if (options.prepare) {
      logger.info({ step: options.prepare.what, url }, 'preparing before ready');
      await options.prepare.run(database.db, url);
      prepared();
    }
    // After the start-up step, so documents it wrote without the store (the demo's) are projected too.
    // Only documents whose log moved past their projection are noted (projection/catch-up.ts).
    scheduleCatchUp(database.db, projector)
      .then((behind) => logger.info({ documents: behind }, 'projection catch-up noted documents behind their log'))
      .catch((err: unknown) => logger.warn({ err }, 'projection catch-up could not start'));

    const sweep = setInterval(() => {
      sessions.deleteExpired().catch((err: unknown) => logger.warn({ err }, 'expired-session sweep failed'));
    }, SESSION_SWEEP_MS);
    sweep.unref();
    cleanups.push(async () => clearInterval(sweep));

    let closing: Promise<void> | undefined;
    return {
      url,
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
