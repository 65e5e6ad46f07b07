/** What every route handler can reach: dependencies, and the signed-in session once checked. */
import type { Db, DbKind } from '@gloss/db';
import type { FirstRun } from '../auth/first-run.js';
import type { RateLimiter } from '../auth/rate-limit.js';
import type { SessionService, ValidSession } from '../auth/sessions.js';
import type { ServerConfig } from '../config.js';
import type { Logger } from '../logger.js';
import type { CommentEvents } from '../comments/events.js';
import type { StudyEvents } from '../exchange/study-events.js';
import type { UpdateStore } from '../sync/contracts.js';
import type { LiveAccess } from '../sync/live-access.js';
import type { DocWriter } from '../rounds/doc-change.js';
import type { Readiness } from '../readiness.js';
import type { HeavyWork } from '../heavy/pool.js';
import type { HeavyLimits } from '../heavy/limits.js';
import type { SessionAuthorizer } from '../access/authorizer.js';
import type { TicketBook } from '../access/tickets.js';

export interface AppDeps {
  db: Db;
  dbKind: DbKind;
  /** Documents' current state (segments, versions, agreement read it); absent in bare app tests. */
  store?: Pick<UpdateStore, 'load'> & Partial<Pick<UpdateStore, 'flush'>>;
  sessions: SessionService;
  signInLimiter: RateLimiter;
  /**
   * Call after changing anything access is decided from (membership, role, session, a round's phase):
   * open sync connections on every node are re-checked and closed or downgraded if they lost a right.
   */
  liveAccess: LiveAccess;
  /** The sync upgrade's authorizer, for deciding a page's rooms ahead (the opening request); absent in bare app tests. */
  authorizer?: Pick<SessionAuthorizer, 'grantsFor'>;
  /** Where the opening request leaves its decisions for the page's sockets; absent: no tickets. */
  tickets?: Pick<TicketBook, 'stamp' | 'issue'>;
  config: Pick<ServerConfig, 'publicUrl' | 'maxBodyBytes' | 'webDist' | 'trustProxy' | 'signInMaxFailures' | 'signInMaxFailuresPerEmail' | 'signInMaxFailuresPerAddress'>;
  /** Live comment events across nodes; absent in bare app tests. */
  commentEvents?: CommentEvents;
  /** Live study changes (texts added, an import) across nodes; absent in bare app tests. */
  studyEvents?: StudyEvents;
  /** Notes documents written outside sync (imports) for the relational projection; `settle` projects them now. */
  projector?: { notify(docId: string): void; settle?(docIds: readonly string[]): Promise<void> };
  /** Server-made document changes through the sync layer (absent in bare app tests). */
  docs?: DocWriter;
  /** Connection and room counts for /api/health (shown to owners only). */
  health?: () => Record<string, unknown>;
  /** The server's one logger (JSON lines on stderr); absent in bare app tests: errors go to a default one. */
  logger?: Logger;
  /** Start-up steps still pending; absent: always ready (bare app tests). */
  readiness?: Readiness;
  /** The first-run claim (set-up code); absent: this server cannot be set up from the browser. */
  firstRun?: FirstRun;
  /** Worker threads for heavy work (heavy/pool.ts); absent: the jobs run in place (bare app tests). */
  heavy?: HeavyWork;
  /** Per-person limits on heavy routes (heavy/limits.ts); absent: none (bare app tests). */
  heavyLimits?: HeavyLimits;
}

export interface AppEnv {
  Variables: {
    session: ValidSession;
  };
}
