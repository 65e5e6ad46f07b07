/**
 * The small interfaces that join the sync layer to the rest of the server.
 * sync/ depends only on these; store/, access/ and relay/ implement them.
 */
import type { IncomingMessage } from 'node:http';

import type { Role } from '@gloss/db';
import type { MemoReaderView } from '../access/memo-view.js';
// One Role type for the whole server: the database's (memberships.role).
export type { Role };
export type DocKind = 'text' | 'layer' | 'codebook' | 'memos';

/** What an authenticated connection may do in one room. */
export type WriteRule = 'own-memos' | 'proposals-only';

export interface RoomGrant {
  /** The canonical room name (the lower-case document id): one Room per document, whatever the URL's casing. */
  room: string;
  /** The documents-table id behind the room. */
  docId: string;
  /** The study the document belongs to (live re-evaluation finds connections by it). */
  studyId: string;
  kind: DocKind;
  userId: string;
  userName: string;
  /** The session the connection was opened with; the connection must not outlive it. */
  sessionId: string;
  sessionExpiresAt: Date;
  role: Role;
  /** false: sync-step-2 and update messages are refused at the first bytes. */
  canWrite: boolean;
  /**
   * A write narrower than the whole document, checked update by update on the server before anything
   * is stored (access/write-rules.ts): `own-memos` (each person writes only memos they wrote),
   * `proposals-only` (a coder adds code proposals of their own to the codebook, nothing else).
   */
  writeRule?: WriteRule;
  /**
   * Other people's presence fields that show where they point (caret, selection, hovered segment)
   * are withheld from this connection: its user codes the room's text independently in a round.
   * Their names stay. Read on every send, so a re-checked grant takes effect at once.
   */
  hidePointing?: boolean;
  /**
   * The memos room only: which entries this reader may receive (access/memo-view.ts). States and
   * changes reach the connection with the others' structs replaced by placeholders (memo-filter.ts);
   * when a re-check finds another view, the connection closes with 4409 so the client starts afresh.
   */
  memoView?: MemoReaderView;
  /**
   * Yjs client ids of the documents a de-identification purge replaced with this one: an update
   * carrying a struct of one of them comes from an old copy, and closes its connection with 4410.
   */
  retiredClients?: readonly number[];
}

/** The outcome of re-running the decision for an open connection: its grant now, or why it lost the room. */
export type Recheck = { ok: true; grant: RoomGrant } | { ok: false; reason: string; /** default 1008 */ closeCode?: number };

/**
 * Decides, at the WebSocket upgrade, whether a request may open a room. Throws an HttpError (401/403/404).
 * `recheck` runs the same decision again for an open connection from what is already known (its
 * session and user), so the rule lives in one place for both.
 */
export interface RoomAuthorizer {
  authorize(req: IncomingMessage, room: string): Promise<RoomGrant>;
  recheck(grant: RoomGrant): Promise<Recheck>;
}

/** Durable, append-only storage of Yjs updates per document. */
export interface UpdateStore {
  /** Snapshot plus every later log entry, in order; `seq` is the highest sequence number included. */
  load(docId: string): Promise<{ updates: Uint8Array[]; seq: number }>;
  /** Resolves once the update is committed (group commit inside). Returns its sequence number. */
  append(docId: string, update: Uint8Array, userId: string | null): Promise<number>;
  /**
   * Updates committed after `seq` (for catch-up after a relay subscription or a lost message).
   * `seqs`, when given, is each update's own sequence number (0 for a snapshot, which folds many).
   */
  since(docId: string, seq: number): Promise<{ updates: Uint8Array[]; seq: number; seqs?: number[] }>;
  /** Waits for in-flight commits; after this resolves nothing appended earlier is pending. */
  flush(): Promise<void>;
  /**
   * The same for one document only (a room's unload): every append of `docId` made before the call,
   * queued or in a batch being written, has committed or failed (and, behind a projector, been
   * projected). Appends of other documents are not waited for. Absent: the room falls back to flush().
   */
  flushDoc?(docId: string): Promise<void>;
  close(): Promise<void>;
}

/**
 * One subscriber's hold on a room's channel. Several may hold the same room on one node (a room whose
 * load outlived its timeout, and the newer room of that name): each leaves only its own, and the node
 * stays subscribed while any is held.
 */
export interface RelaySubscription {
  /** Leaves: this subscriber hears nothing more. Idempotent; while the relay cannot be reached, resolves at once. */
  unsubscribe(): Promise<void>;
}

/** Fan-out of room messages across nodes (Redis: relay/redis-relay.ts; in one process: relay/memory-relay.ts). One node: noRelay. */
export interface Relay {
  /**
   * Subscribe to a room; resolves once the subscription is active (catch up from the log after this).
   * While the relay cannot be reached it resolves at once, never waiting for it: the subscription is
   * made when the relay is back, before the `onReconnect` listeners are called (catch up then).
   * Every subscriber of the room on this node receives each message from another node.
   */
  subscribe(room: string, onMessage: (payload: Uint8Array) => void): Promise<RelaySubscription>;
  publish(room: string, payload: Uint8Array): Promise<void>;
  close(): Promise<void>;
  /** True when messages can be lost (pub/sub), so open rooms re-read the log now and then. Absent: false. */
  readonly lossy?: boolean;
  /**
   * Optional: calls `listener` after the relay reconnected and every wanted subscription is active again
   * (messages may have been lost meanwhile); returns an unsubscribe.
   */
  onReconnect?(listener: () => void): () => void;
}
