/**
 * One WebSocket in one room: decodes its messages, enforces its grant, owns at most one awareness
 * client id. Any error in its input closes this connection only.
 */
import type { WebSocket } from 'ws';
import * as Y from 'yjs';
import type { RoomGrant, WriteRule } from './contracts.js';
import { decodeAwarenessUpdate, encodeAwarenessUpdate, type AwarenessEntry } from './awareness-table.js';
import { withoutPointing } from './pointing-filter.js';
import { AppCloseCode, CloseCode, SyncError } from './errors.js';
import type { SyncLogger } from './logger.js';
import { encodeAwarenessMessage, encodePermissionDenied, encodeSyncStep1, encodeSyncStep2, encodeSyncUpdate, peekKind, readPayload } from './protocol.js';
import type { Room, RoomPeer } from './room.js';
import { carriesClient, checkUpdate } from './update-check.js';
import { checkWrite } from '../access/write-rules.js';
import { entryFacts, mayReadEntry, seesEverything, type MemoReaderView } from '../access/memo-view.js';
import { MEMOS_ROOT } from '@gloss/model';
import { readableMemos } from '../access/memo-readers.js';

/** Why a memos connection closes with 4409 (the web app deletes its copy and opens a fresh one for the new view). */
export const MEMOS_VIEW_CHANGED = 'What you may read in the memos changed: this device’s copy is replaced with a fresh one.';
import { DEFAULT_BUDGETS, TokenBucket } from './budgets.js';

/** Messages held per connection while its room loads; a client needs a handful (sync step 1, awareness, edits). */
const MAX_BACKLOG = 1_000;
export const DEFAULT_MAX_PRESENCE_BYTES = 64 * 1024;

export interface ConnectionLimits {
  /** Largest presence state (JSON, UTF-8 bytes) this connection may hold; it is replayed to every joiner. */
  maxPresenceBytes: number;
  /** Bytes held for this connection before its room has loaded. */
  maxBacklogBytes: number;
  /** Its updates awaiting commit plus what waits to be written to its socket, in bytes. */
  maxPendingBytes: number;
  maxMessagesPerSecond: number;
  messageBurst: number;
}

export const DEFAULT_CONNECTION_LIMITS: ConnectionLimits = {
  maxPresenceBytes: DEFAULT_MAX_PRESENCE_BYTES,
  maxBacklogBytes: DEFAULT_BUDGETS.maxBacklogBytes,
  maxPendingBytes: DEFAULT_BUDGETS.maxPendingBytesPerConnection,
  maxMessagesPerSecond: DEFAULT_BUDGETS.maxMessagesPerSecond,
  messageBurst: DEFAULT_BUDGETS.messageBurst,
};

const utf8 = new TextEncoder();

export class Connection implements RoomPeer {
  /** Messages that arrive before the room is ready, handled in order once it is. */
  private backlog: Uint8Array[] | null = [];
  private backlogBytes = 0;
  /** Bytes of this connection's updates submitted and not yet committed (or failed). */
  private pendingCommitBytes = 0;
  private readonly messages: TokenBucket;
  private readsPaused = false;
  private room: Room | null = null;
  private ownedClientId: number | null = null;
  private closed = false;
  private corked = false;
  /** Cleared by each keepalive ping, set again by the pong. */
  private alive = true;

  constructor(
    readonly ws: WebSocket,
    private grantValue: RoomGrant,
    private readonly logger: SyncLogger,
    private readonly limits: ConnectionLimits = DEFAULT_CONNECTION_LIMITS,
    /** Called once when the connection stops (closed for any reason): lets go of its commit-queue place. */
    private readonly onStop: (connection: Connection) => void = () => {},
  ) {
    const grant = grantValue;
    this.messages = new TokenBucket(limits.maxMessagesPerSecond, limits.messageBurst);
    ws.on('message', (data, isBinary) => this.onMessage(data as Buffer, isBinary));
    ws.on('pong', () => {
      this.alive = true;
    });
    // ws closes with 1009 itself for oversized frames and reports it here.
    ws.on('error', (error) => this.logger.warn({ err: error, room: grant.room }, 'websocket error'));
  }

  /** What this connection may do now; live re-evaluation can narrow (or widen) it while it is open. */
  get grant(): RoomGrant {
    return this.grantValue;
  }

  /**
   * Applies a re-evaluated grant for the same room. Losing write takes effect at the next message:
   * its writes are refused at the first bytes like any read-only connection's, and the client is told once now.
   */
  regrant(grant: RoomGrant): void {
    if (this.room !== null && widens(this.room.doc, this.grantValue.memoView, grant.memoView)) {
      // The client's copy was filtered for the old view: an entry withheld then and readable now would
      // never arrive (its clocks already cover the placeholders), so the copy must be replaced.
      this.revoke(MEMOS_VIEW_CHANGED, AppCloseCode.viewChanged);
      return;
    }
    const lostWrite = this.grantValue.canWrite && !grant.canWrite;
    const nowHidden = !this.grantValue.hidePointing && grant.hidePointing === true;
    this.grantValue = grant;
    if (lostWrite) this.send(encodePermissionDenied('read-only'));
    if (nowHidden && this.room !== null) {
      // Its user now codes this text independently: replace the pointing positions the client holds
      // now. Clients take a state only with a newer clock, so these go one clock ahead (the owner's own
      // next state at that clock is then skipped here; the one after it arrives filtered as usual).
      const ahead = this.room.awareness.snapshot().map((e) => (e.clientId === this.ownedClientId ? e : { ...e, clock: e.clock + 1 }));
      if (ahead.length > 0) this.send(encodeAwarenessMessage(encodeAwarenessUpdate(withoutPointing(ahead, this.ownedClientId))));
    }
  }

  /** Closes this connection because it may no longer read its room (1008 unless told otherwise, a plain reason). */
  revoke(reason: string, closeCode: number = CloseCode.policyViolation): void {
    if (this.closed) return;
    this.closed = true;
    this.backlog = null;
    this.logger.debug?.({ room: this.grantValue.room, userId: this.grantValue.userId, reason }, 'access revoked; closing');
    this.ws.close(closeCode, closeReason(reason));
  }

  /** Called once the room has loaded: greet, then handle what queued up meanwhile. */
  start(room: Room): void {
    this.room = room;
    this.send(encodeSyncStep1(Y.encodeStateVector(room.doc)));
    room.sendAwarenessTo(this);
    const queued = this.backlog ?? [];
    this.backlog = null;
    for (const message of queued) this.handle(message);
  }

  /** Leaving the room: drop this connection's presence for everyone. */
  stop(): void {
    this.closed = true;
    this.backlog = null;
    this.onStop(this);
    if (this.room !== null && this.ownedClientId !== null) this.room.releasePresence(this.ownedClientId, this);
  }

  send(message: Uint8Array): void {
    if (this.ws.readyState !== this.ws.OPEN) return;
    this.corkUntilTickEnds();
    this.ws.send(message);
    // A peer that does not read makes the server hold everything sent to it; past the budget it goes.
    if (this.ws.bufferedAmount > this.limits.maxPendingBytes) {
      this.fail(
        new SyncError('too-much-pending', `over ${this.limits.maxPendingBytes} bytes waiting to be sent; the client is not reading`, CloseCode.tryAgainLater),
      );
    }
  }

  /** The node's commit queue is deep: stop reading this socket (TCP pushes back on the client). */
  pauseReads(): void {
    if (this.readsPaused || this.closed) return;
    this.readsPaused = true;
    this.ws.pause();
  }

  resumeReads(): void {
    if (!this.readsPaused) return;
    this.readsPaused = false;
    // A pong that arrived while paused is still unread: a full interval to read it.
    this.alive = true;
    if (!this.closed) this.ws.resume();
  }

  /**
   * One keepalive round: a connection that did not answer the previous ping ends, the others are pinged.
   * While its reads are paused (the node's commit queue is deep) a client's pong cannot be read either
   * (control frames come on the same stream), so it is not judged then: the node's own backlog must not
   * end live clients.
   */
  keepalive(): void {
    if (this.readsPaused || this.closed) return;
    if (!this.alive) return void this.ws.terminate();
    this.alive = false;
    this.ws.ping();
  }

  /**
   * Messages sent in one turn (a committed batch's updates, applied one after another) leave in one
   * write: the socket is corked at the first send and uncorked once the turn's microtasks have run.
   * One writev per peer per batch instead of per update; the write system call was most of the
   * relay's CPU under load (issue 11 profile). Only the socket's buffering changes, not what is sent.
   */
  private corkUntilTickEnds(): void {
    if (this.corked) return;
    const socket = (this.ws as unknown as { _socket?: { cork(): void; uncork(): void } })._socket;
    if (socket === undefined) return; // ws keeps its net.Socket there; without it, send as before
    this.corked = true;
    socket.cork();
    process.nextTick(() => {
      this.corked = false;
      socket.uncork();
    });
  }

  /** A change of the room's document, in the version this connection may read. */
  sendUpdate(update: Uint8Array, message: Uint8Array): void {
    // Before start: the memos wait for the answer to the client's first sync step, which covers them.
    if (this.room === null) return void (this.grant.kind !== 'memos' && this.send(message));
    const filtered = this.readable(this.room, update);
    this.send(filtered === update ? message : encodeSyncUpdate(filtered));
  }

  /** `update` as this connection may receive it: the memos room withholds entries its view refuses. */
  private readable(room: Room, update: Uint8Array): Uint8Array {
    return this.grant.kind === 'memos' ? readableMemos(room.doc, update, this.grant.memoView) : update;
  }

  sendAwareness(entries: readonly AwarenessEntry[], message: Uint8Array): void {
    if (!this.grant.hidePointing) return this.send(message);
    this.send(encodeAwarenessMessage(encodeAwarenessUpdate(withoutPointing(entries, this.ownedClientId))));
  }

  fail(error: SyncError): void {
    if (this.closed) return;
    this.closed = true;
    this.backlog = null;
    this.onStop(this);
    this.logger.warn({ code: error.code, room: this.grantValue.room, userId: this.grantValue.userId, err: error.cause }, error.message);
    this.ws.close(error.closeCode, error.message.slice(0, 120));
  }

  private onMessage(data: Buffer, isBinary: boolean): void {
    if (this.closed) return;
    if (!isBinary) {
      this.fail(new SyncError('unsupported-message', 'text frames are not part of the protocol', CloseCode.unsupportedData));
      return;
    }
    if (!this.messages.take()) {
      this.fail(
        new SyncError('too-many-messages', `over ${this.limits.maxMessagesPerSecond} messages per second (burst ${this.limits.messageBurst})`, CloseCode.policyViolation),
      );
      return;
    }
    const message = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
    if (this.backlog === null) return this.handle(message);
    this.backlogBytes += message.byteLength;
    if (this.backlog.length >= MAX_BACKLOG || this.backlogBytes > this.limits.maxBacklogBytes) {
      this.fail(new SyncError('too-much-pending', `over ${this.limits.maxBacklogBytes} bytes or ${MAX_BACKLOG} messages before the document loaded`, CloseCode.tryAgainLater));
      return;
    }
    this.backlog.push(message);
  }

  private handle(message: Uint8Array): void {
    if (this.closed || this.room === null) return;
    try {
      this.dispatch(message, this.room);
    } catch (error) {
      this.fail(
        error instanceof SyncError
          ? error
          : new SyncError('malformed-message', 'message could not be handled', CloseCode.invalidPayload, { cause: error }),
      );
    }
  }

  /** The write rule's refusal of `update` against the room's state (plus updates in flight), or null. */
  /** Hands an update to the room; its bytes count against this connection's budget until it is stored or refused. */
  private submit(room: Room, update: Uint8Array): void {
    const size = update.byteLength;
    this.pendingCommitBytes += size;
    const settled = () => {
      this.pendingCommitBytes -= size;
    };
    void room.submitUpdate(update, this, this.grant.userId).then(settled, settled);
  }

  private judge(room: Room, rule: WriteRule, update: Uint8Array): string | null {
    const scratch = room.scratchCopy();
    try {
      return checkWrite(rule, scratch, update, this.grant.userId);
    } finally {
      scratch.destroy();
    }
  }

  /** Holds this connection's later messages until `work` settles, then handles them in order. */
  private holdWhile(work: Promise<void>): void {
    this.backlog = [];
    work
      .catch((error: unknown) => this.logger.error({ err: error, room: this.grant.room }, 'judging a held update failed'))
      .finally(() => {
        const queued = this.backlog ?? [];
        this.backlog = null;
        while (queued.length > 0 && this.backlog === null) this.handle(queued.shift()!);
        if (this.backlog !== null) (this.backlog as Uint8Array[]).unshift(...queued); // held again: keep the order
      });
  }

  private dispatch(message: Uint8Array, room: Room): void {
    const { kind, decoder } = peekKind(message);
    switch (kind) {
      case 'sync-step1': {
        const stateVector = readPayload(decoder);
        let diff: Uint8Array;
        try {
          diff = Y.encodeStateAsUpdate(room.doc, stateVector);
        } catch (cause) {
          throw new SyncError('malformed-message', 'bad state vector', CloseCode.invalidPayload, { cause });
        }
        this.send(encodeSyncStep2(this.readable(room, diff)));
        return;
      }
      case 'sync-step2':
      case 'sync-update': {
        if (!this.grant.canWrite) {
          this.send(encodePermissionDenied('read-only'));
          return;
        }
        const update = readPayload(decoder);
        if (checkUpdate(update).empty) return;
        const retired = this.grant.retiredClients;
        if (retired !== undefined && retired.length > 0 && carriesClient(update, retired)) {
          throw new SyncError('retired-copy', 'this copy predates the de-identification purge: discard it and reload', AppCloseCode.replaced);
        }
        if (this.pendingCommitBytes + update.byteLength + this.ws.bufferedAmount > this.limits.maxPendingBytes) {
          throw new SyncError('too-much-pending', `over ${this.limits.maxPendingBytes} bytes of updates waiting to be stored`, CloseCode.tryAgainLater);
        }
        const rule = this.grant.writeRule;
        if (rule !== undefined && this.judge(room, rule, update) !== null) {
          // This node may be behind the log: a client that failed over from another node resends what
          // it had from there (others' memos, committed there and not yet relayed here), which the rule
          // would take for forgeries. Judge again once the room holds everything committed; what is
          // already in the log then changes nothing and only the client's own edits are judged.
          // Later messages of this connection wait meanwhile, so their order holds.
          this.holdWhile(
            room.catchUpNow().then(() => {
              if (this.closed) return;
              const writeRule = this.grant.writeRule;
              if (!this.grant.canWrite) return void this.send(encodePermissionDenied('read-only'));
              const refusal = writeRule === undefined ? null : this.judge(room, writeRule, update);
              if (refusal !== null) {
                // Nothing is stored or relayed; the client is told in words and stays connected.
                this.logger.warn({ room: this.grant.room, userId: this.grant.userId, rule: writeRule, refusal }, 'update refused by its write rule');
                this.send(encodePermissionDenied(refusal));
                return;
              }
              this.submit(room, update);
            }),
          );
          return;
        }
        this.submit(room, update);
        return;
      }
      case 'awareness': {
        const entries = decodeAwarenessUpdate(readPayload(decoder));
        for (const e of entries) {
          const bytes = utf8.encode(e.state).byteLength;
          if (bytes > this.limits.maxPresenceBytes) {
            throw new SyncError('presence-too-large', `presence state of ${bytes} bytes is over the limit of ${this.limits.maxPresenceBytes}`, CloseCode.tooBig);
          }
        }
        // The first state this connection sends names its client id; it speaks for that one only.
        const first = entries.find((e) => e.state !== 'null');
        if (this.ownedClientId === null && first !== undefined) {
          if (!room.claimPresence(first.clientId, this, this.grant.userId)) {
            throw new SyncError('presence-taken', `presence client id ${first.clientId} belongs to another person's connection`, CloseCode.policyViolation);
          }
          this.ownedClientId = first.clientId;
        }
        // Others' ids (a client passes on removals of states it timed out) are not this connection's to speak for.
        room.submitAwareness(entries.filter((e) => e.clientId === this.ownedClientId && room.ownsPresence(e.clientId, this)), this);
        return;
      }
      case 'query-awareness':
        room.sendAwarenessTo(this);
        return;
      case 'auth':
        return; // clients have nothing to say to the server here
    }
  }
}

/**
 * Whether an entry of the memos document withheld under `before` is readable under `after`. A view
 * that only narrows needs no new copy: what it now withholds is filtered from here on (the client
 * keeps what it was allowed to receive before).
 */
function widens(doc: Y.Doc, before: MemoReaderView | undefined, after: MemoReaderView | undefined): boolean {
  if (before === undefined || after === undefined || before.key === after.key || seesEverything(before)) return false;
  // every key, deleted entries included: their structs travel as well
  for (const key of (doc.getMap(MEMOS_ROOT) as unknown as { _map: Map<string, unknown> })._map.keys()) {
    const facts = entryFacts(doc, key);
    if (!mayReadEntry(before, facts) && mayReadEntry(after, facts)) return true;
  }
  return false;
}

/** A WebSocket close reason holds at most 123 bytes of UTF-8 (RFC 6455 §5.5); longer ones are cut at a character. */
export function closeReason(reason: string): string {
  const encoder = new TextEncoder();
  let out = reason;
  while (encoder.encode(out).length > 123) out = Array.from(out).slice(0, -1).join('');
  return out;
}
