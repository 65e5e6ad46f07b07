/**
 * One open document: its Y.Doc, presence, local peers and lifecycle (room-state.ts:
 * loading -> open -> unloading -> closed, or loading -> failed). Client updates are committed to the
 * store before they are applied (and so broadcast) or relayed; applies keep arrival order per room.
 */
import * as Y from 'yjs';
import type { Relay, RelaySubscription, UpdateStore } from './contracts.js';
import { AwarenessTable, decodeAwarenessUpdate, encodeAwarenessUpdate, type AwarenessEntry } from './awareness-table.js';
import { AppCloseCode, CloseCode, SyncError } from './errors.js';
import type { SyncLogger } from './logger.js';
import { encodeAwarenessMessage, encodeSyncUpdate } from './protocol.js';
import { decodeRelayFrame, encodeRelayFrame } from './relay-frame.js';
import type { CommitQueueBudget, Pausable } from './budgets.js';
import { RoomError, RoomStateMachine, within, type RoomState } from './room-state.js';

export type { RoomState };

/** A local connection as the room sees it. */
export interface RoomPeer {
  send(message: Uint8Array): void;
  /**
   * A change of the document (`message` is it encoded for everyone). Peers that may read only part of
   * the document (memos: memo-filter.ts) send their own version; without this, `message` is sent.
   */
  sendUpdate?(update: Uint8Array, message: Uint8Array): void;
  /** Presence news; `message` is the entries encoded as they are, for peers that may see them all. */
  sendAwareness(entries: readonly AwarenessEntry[], message: Uint8Array): void;
  fail(error: SyncError): void;
  /** Present on real connections: their socket reads pause while the node's commit queue is deep. */
  pauseReads?(): void;
  resumeReads?(): void;
  /** A peer that only holds the room open (an opening request's lease): its room counts as idle. */
  readonly lease?: boolean;
}

export interface RoomDeps {
  store: UpdateStore;
  relay: Relay;
  logger: SyncLogger;
  /** Re-read the log this often while open (recovers relay messages that never arrived); 0 = never. */
  catchUpIntervalMs: number;
  /** A load taking longer fails the room and its waiters. */
  loadTimeoutMs: number;
  /** The unload waits this long for its own commits and projection, then lets go (logged). */
  unloadTimeoutMs: number;
  /** The node's commit queue (count and bytes), shared by all rooms. */
  commits: CommitQueueBudget;
}

const FROM_STORE = Symbol('store');
const FROM_RELAY = Symbol('relay');

export class Room {
  private readonly machine = new RoomStateMachine();
  /** When a peer last joined, left or wrote (least-recently-used unloading). */
  lastUsed = performance.now();
  readonly doc = new Y.Doc({ gc: false });
  readonly awareness = new AwarenessTable();
  readonly peers = new Set<RoomPeer>();
  /** Which local connection speaks for each presence client id, and for whom (DESIGN §6: one id per connection). */
  private readonly presenceOwners = new Map<number, { peer: RoomPeer; userId: string }>();
  readonly ready: Promise<void>;
  private unloading: Promise<void> | null = null;
  /** Per-room order of applies: each link waits for its own commit and for every earlier link. */
  private tail: Promise<void> = Promise.resolve();
  private relayBacklog: Uint8Array[] = [];
  /** Catch-up reads from `cursor`, which trails the last high-water mark by one round (see catchUp). */
  private cursor = 0;
  private lastHigh = 0;
  private catchingUp = false;
  private catching: Promise<void> | null = null;
  /** The relay came back while this room loaded: catch up once open (the load may have read before that). */
  private catchUpOnOpen = false;
  /** Seqs above the cursor already applied here (own commits, relayed updates): catch-up skips them. */
  private readonly applied = new Set<number>();
  private timer: NodeJS.Timeout | null = null;
  /**
   * This room's own hold on the relay: its release ends only this one, so a room whose load ended after
   * its timeout leaves a newer room of the same name subscribed.
   */
  private subscription: RelaySubscription | null = null;
  /** Updates accepted from local peers and not applied yet (their commit is in flight), in order. */
  private readonly inFlight: Uint8Array[] = [];

  constructor(
    readonly name: string,
    readonly docId: string,
    private readonly deps: RoomDeps,
  ) {
    this.doc.on('update', (update: Uint8Array, origin: unknown) => this.onDocUpdate(update, origin));
    const loading = this.load();
    this.ready = within(loading, deps.loadTimeoutMs, () => new RoomError('load-timeout', `document did not load within ${deps.loadTimeoutMs} ms`)).catch(
      (error: unknown) => {
        if (this.machine.state === 'loading') this.machine.to('failed');
        // A load that ends after its timeout lets go of what it took.
        void loading.then(() => this.release(), () => {});
        throw error instanceof RoomError ? error : new RoomError('load-failed', 'document could not be loaded', { cause: error });
      },
    );
    this.ready.catch(() => {}); // observed by whoever awaits it; the room marks itself failed
  }

  get state(): RoomState {
    return this.machine.state;
  }

  /** Past its life (closed or failed): the registry makes a new room for the name. */
  get ended(): boolean {
    return this.machine.ended;
  }

  /** Resolves once the room is closed or failed. */
  get settled(): Promise<void> {
    return this.machine.settled;
  }

  private async load(): Promise<void> {
    try {
      // Active once this resolves, so the log read below misses nothing the relay does not carry; or,
      // with the relay away, pending: the room loads and serves from the log alone, and catches up
      // when the relay is back (relayReconnected).
      this.subscription = await this.deps.relay.subscribe(this.name, (payload) => this.onRelay(payload));
      const { updates, seq } = await this.deps.store.load(this.docId);
      if (this.machine.state !== 'loading') return; // timed out meanwhile; the caller releases
      applyAll(this.doc, updates, FROM_STORE, this.deps.logger, this.docId);
      this.cursor = this.lastHigh = seq;
    } catch (error) {
      await this.release();
      throw error;
    }
    this.machine.to('open');
    for (const payload of this.relayBacklog.splice(0)) this.onRelay(payload);
    if (this.catchUpOnOpen) void this.catchUp();
    if (this.deps.catchUpIntervalMs > 0) {
      this.timer = setInterval(() => void this.catchUp(), this.deps.catchUpIntervalMs);
      this.timer.unref();
    }
  }

  /** Commit, then apply and relay. `update` was already checked by checkUpdate. Resolves once applied (or failed). */
  submitUpdate(update: Uint8Array, from: RoomPeer, userId: string | null): Promise<void> {
    const size = update.byteLength;
    const budget = this.deps.commits;
    if (!budget.admits(size)) {
      from.fail(new SyncError('server-busy', 'the server is busy storing updates; try again later', CloseCode.tryAgainLater));
      return this.tail;
    }
    this.lastUsed = performance.now();
    budget.add(size, from.pauseReads && from.resumeReads ? (from as Pausable) : null);
    const committed = this.deps.store.append(this.docId, update, userId);
    committed.catch(() => {}); // handled in order below
    this.inFlight.push(update);
    const landed = () => {
      budget.done(size);
      const at = this.inFlight.indexOf(update);
      if (at >= 0) this.inFlight.splice(at, 1);
    };
    this.tail = this.tail.then(
      () =>
        committed.then(
          (seq) => {
            landed();
            this.applySafely(update, from);
            if (this.deps.catchUpIntervalMs > 0) this.applied.add(seq);
            this.publish(encodeRelayFrame({ kind: 'update', seq, data: update }));
          },
          (cause: unknown) => {
            landed();
            // A document a purge retired (or a deletion removed) refuses appends: the sender holds a copy to discard.
            if ((cause as { code?: unknown } | null)?.code === 'document-gone') {
              this.deps.logger.warn({ room: this.name }, 'update to a retired or deleted document refused; closing its connection');
              from.fail(new SyncError('store-failed', 'this document was replaced or deleted', AppCloseCode.replaced, { cause }));
              return;
            }
            this.deps.logger.error({ err: cause, room: this.name }, 'update not stored; closing its connection');
            from.fail(new SyncError('store-failed', 'update could not be stored', CloseCode.internalError, { cause }));
          },
        ),
    );
    return this.tail;
  }

  /**
   * An update committed to the log outside sync (an import's transaction): applied here in order with
   * the room's other applies (local peers receive it) and relayed to other nodes.
   */
  applyCommitted(seq: number, update: Uint8Array): Promise<void> {
    this.tail = this.tail.then(() => {
      if (this.machine.state !== 'open') return;
      try {
        Y.applyUpdate(this.doc, update, FROM_STORE);
      } catch (error) {
        this.deps.logger.error({ err: error, room: this.name }, 'committed update failed to apply');
        return;
      }
      if (this.deps.catchUpIntervalMs > 0) this.applied.add(seq);
      this.publish(encodeRelayFrame({ kind: 'update', seq, data: update }));
    });
    return this.tail;
  }

  /**
   * A scratch copy of the document as it will be once every accepted update has landed (the room's
   * state plus the updates whose commit is in flight), for checking a restricted writer's next update
   * against (access/write-rules.ts). A fresh Y.Doc each time; the caller may change it freely.
   */
  scratchCopy(): Y.Doc {
    const copy = new Y.Doc({ gc: false });
    Y.applyUpdate(copy, Y.encodeStateAsUpdate(this.doc));
    for (const u of this.inFlight) Y.applyUpdate(copy, u);
    return copy;
  }

  /** Takes the awareness entries a peer may speak for; forwards what is news to local peers and other nodes. */
  submitAwareness(entries: readonly AwarenessEntry[], from: RoomPeer | null): void {
    const accepted = this.awareness.apply(entries);
    if (accepted.length === 0) return;
    const update = encodeAwarenessUpdate(accepted);
    this.broadcastAwareness(accepted, encodeAwarenessMessage(update), from);
    if (from !== null) this.publish(encodeRelayFrame({ kind: 'awareness', data: update }));
  }

  /**
   * Gives `clientId` to `peer`. Free, or already its own: yes. Held by another connection of the same
   * person (a reconnect whose old socket is not closed yet): moved, so the old socket's close no longer
   * removes it. Held by someone else's connection: no.
   */
  claimPresence(clientId: number, peer: RoomPeer, userId: string): boolean {
    const held = this.presenceOwners.get(clientId);
    if (held !== undefined && held.peer !== peer && held.userId !== userId) return false;
    this.presenceOwners.set(clientId, { peer, userId });
    return true;
  }

  /** Whether `peer` speaks for `clientId` now. */
  ownsPresence(clientId: number, peer: RoomPeer): boolean {
    return this.presenceOwners.get(clientId)?.peer === peer;
  }

  /** A leaving peer's presence goes, unless the id has moved to another connection since. */
  releasePresence(clientId: number, peer: RoomPeer): void {
    if (!this.ownsPresence(clientId, peer)) return;
    this.presenceOwners.delete(clientId);
    this.removeAwareness(clientId);
  }

  /** Removes a departed client's presence everywhere. */
  removeAwareness(clientId: number): void {
    const removal = this.awareness.remove(clientId);
    if (removal === null) return;
    const update = encodeAwarenessUpdate([removal]);
    this.broadcastAwareness([removal], encodeAwarenessMessage(update), null);
    this.publish(encodeRelayFrame({ kind: 'awareness', data: update }));
  }

  /** Everyone's current presence, sent to one peer (a newcomer, or one that asked). */
  sendAwarenessTo(peer: RoomPeer): void {
    const entries = this.awareness.snapshot();
    if (entries.length > 0) peer.sendAwareness(entries, encodeAwarenessMessage(encodeAwarenessUpdate(entries)));
  }

  private broadcastAwareness(entries: readonly AwarenessEntry[], message: Uint8Array, except: RoomPeer | null): void {
    for (const peer of this.peers) if (peer !== except) peer.sendAwareness(entries, message);
  }

  /** A change of the document to every local peer but its sender, each in the version it may read. */
  private broadcastUpdate(update: Uint8Array, except: RoomPeer | null): void {
    const message = encodeSyncUpdate(update);
    for (const peer of this.peers) {
      if (peer === except) continue;
      if (peer.sendUpdate) peer.sendUpdate(update, message);
      else peer.send(message);
    }
  }

  /**
   * Reads log entries committed since the cursor. The cursor trails by one round because sequence
   * numbers are taken at insert, not commit: a row with a lower number may commit just after a read.
   */
  async catchUp(): Promise<void> {
    if (this.machine.state !== 'open' || this.catchingUp) return;
    this.catchingUp = true;
    const run = this.readSinceCursor();
    this.catching = run;
    return run;
  }

  /**
   * The relay reconnected and renewed its subscriptions (this room's too, if it subscribed while the
   * relay was away): whatever other nodes committed meanwhile was never relayed, so re-read the log,
   * after any read already in flight (which may have started before the subscription was active).
   */
  relayReconnected(): void {
    if (this.machine.state === 'loading') this.catchUpOnOpen = true;
    else void this.catchUpNow();
  }

  /**
   * Catches up from the log now and resolves once everything committed before the call is applied here
   * (after a read already in flight, which may have started before those rows were committed).
   */
  async catchUpNow(): Promise<void> {
    if (this.catching !== null) await this.catching;
    await this.catchUp();
  }

  private async readSinceCursor(): Promise<void> {
    try {
      const { updates, seq, seqs } = await this.deps.store.since(this.docId, this.cursor);
      if (this.machine.state !== 'open') return;
      const missing = seqs === undefined ? updates : updates.filter((_, i) => !this.applied.has(seqs[i]!));
      applyAll(this.doc, missing, FROM_STORE, this.deps.logger, this.docId);
      if (seqs !== undefined) for (const s of seqs) this.applied.add(s);
      this.cursor = Math.min(this.lastHigh, seq);
      this.lastHigh = Math.max(this.lastHigh, seq);
      for (const s of this.applied) if (s <= this.cursor) this.applied.delete(s);
    } catch (error) {
      this.deps.logger.warn({ err: error, room: this.name }, 'catch-up from the log failed; will retry');
    } finally {
      this.catchingUp = false;
      this.catching = null;
    }
  }

  /**
   * Waits for this document's own commits and projection (not the node's whole queue), leaves the
   * relay, closes. Bounded by the unload timeout: a stuck commit is logged and let go, so the name can
   * load again (from the log, which has every committed update). Idempotent; an open room only.
   */
  unload(): Promise<void> {
    this.unloading ??= (async () => {
      this.machine.to('unloading');
      if (this.timer !== null) clearInterval(this.timer);
      const ms = this.deps.unloadTimeoutMs;
      const store = this.deps.store;
      const own = async () => {
        await this.tail;
        await (store.flushDoc ? store.flushDoc(this.docId) : store.flush());
      };
      try {
        await within(own(), ms, () => new RoomError('unload-timeout', `own commits did not settle within ${ms} ms`));
      } catch (error) {
        this.deps.logger.warn({ err: error, room: this.name }, 'room unload: own commits or projection did not settle; unloading anyway');
      }
      await this.release();
      this.machine.to('closed');
    })();
    return this.unloading;
  }

  /**
   * Leaves the relay (this room's subscription only: another room of the name may hold one too) and frees
   * the document (unload, or a load that failed or ended after its timeout).
   */
  private async release(): Promise<void> {
    const subscription = this.subscription;
    this.subscription = null;
    try {
      await subscription?.unsubscribe();
    } catch (error) {
      this.deps.logger.warn({ err: error, room: this.name }, 'room: relay unsubscribe failed');
    }
    this.doc.destroy();
  }

  private onRelay(payload: Uint8Array): void {
    if (this.machine.state === 'loading') {
      this.relayBacklog.push(payload);
      return;
    }
    if (this.machine.state !== 'open') return;
    const frame = decodeRelayFrame(payload);
    if (frame === null) return;
    try {
      if (frame.kind === 'update') {
        Y.applyUpdate(this.doc, frame.data, FROM_RELAY);
        if (this.deps.catchUpIntervalMs > 0) this.applied.add(frame.seq);
      } else this.submitAwareness(decodeAwarenessUpdate(frame.data), null);
    } catch (error) {
      this.deps.logger.warn({ err: error, room: this.name }, 'ignored an unreadable relay message');
    }
  }

  private onDocUpdate(update: Uint8Array, origin: unknown): void {
    if (this.machine.state !== 'open') return;
    const except = origin === FROM_STORE || origin === FROM_RELAY ? null : (origin as RoomPeer);
    this.broadcastUpdate(update, except);
  }

  private applySafely(update: Uint8Array, from: RoomPeer): void {
    if (this.machine.ended) return;
    try {
      Y.applyUpdate(this.doc, update, from);
    } catch (error) {
      this.deps.logger.error({ err: error, room: this.name }, 'stored update failed to apply');
    }
  }

  private publish(payload: Uint8Array): void {
    this.deps.relay.publish(this.name, payload).catch((error: unknown) => {
      this.deps.logger.warn({ err: error, room: this.name }, 'relay publish failed; other nodes catch up from the log');
    });
  }
}

/** Applies stored updates in one transaction; falls back to one by one so a bad row cannot block a document. */
function applyAll(doc: Y.Doc, updates: Uint8Array[], origin: unknown, logger: SyncLogger, docId: string): void {
  if (updates.length === 0) return;
  try {
    Y.applyUpdate(doc, updates.length === 1 ? updates[0]! : Y.mergeUpdates(updates), origin);
    return;
  } catch (error) {
    logger.warn({ err: error, docId }, 'merged load failed; applying stored updates one by one');
  }
  for (const update of updates) {
    try {
      Y.applyUpdate(doc, update, origin);
    } catch (error) {
      logger.error({ err: error, docId }, 'skipped a stored update that does not apply');
    }
  }
}
