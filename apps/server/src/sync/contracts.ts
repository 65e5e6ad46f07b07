/**
 * The small interfaces that join the sync layer to the rest of the server.
 * sync/ depends only on these; store/, access/ and relay/ implement them.
 */
import type { IncomingMessage } from 'node:http';

export type Role = 'owner' | 'lead' | 'coder' | 'trainee' | 'observer';
export type DocKind = 'text' | 'layer' | 'codebook' | 'memos';

/** What an authenticated connection may do in one room. */
export interface RoomGrant {
  room: string;
  /** The documents-table id behind the room. */
  docId: string;
  kind: DocKind;
  userId: string;
  userName: string;
  role: Role;
  /** false: sync-step-2 and update messages are refused at the first bytes. */
  canWrite: boolean;
}

/** Decides, at the WebSocket upgrade, whether a request may open a room. Throws an HttpError (401/403/404). */
export interface RoomAuthorizer {
  authorize(req: IncomingMessage, room: string): Promise<RoomGrant>;
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
  close(): Promise<void>;
}

/** Fan-out of room messages across nodes (Redis). One node: NoRelay. */
export interface Relay {
  /** Subscribe to a room; resolves once the subscription is active (catch up from the log after this). */
  subscribe(room: string, onMessage: (payload: Uint8Array) => void): Promise<void>;
  unsubscribe(room: string): Promise<void>;
  publish(room: string, payload: Uint8Array): Promise<void>;
  close(): Promise<void>;
  /** True when messages can be lost (pub/sub), so open rooms re-read the log now and then. Absent: false. */
  readonly lossy?: boolean;
  /** Optional: calls `listener` after the relay reconnected (messages may have been lost); returns an unsubscribe. */
  onReconnect?(listener: () => void): () => void;
}
