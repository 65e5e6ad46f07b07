/**
 * One open document: a Y.Doc kept in IndexedDB (offline copy) and synced over the y-websocket protocol.
 * Its lifecycle is one explicit state. Handles are shared and reference-counted per room, so two
 * screens showing the codebook use one Y.Doc and one connection.
 */
import * as Y from 'yjs';
import { WebsocketProvider } from 'y-websocket';
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import * as syncProtocol from 'y-protocols/sync';
import { IndexeddbPersistence } from 'y-indexeddb';
import { createSignal, type Accessor } from 'solid-js';
import { syncBaseUrl } from './room-url.js';
import { readPending, writePending } from './pending.js';
import { registerDoc, unregisterDoc } from './status.js';
import { closeKept, forgetKept } from './kept-states.js';

export type Confirmation = { outcome: 'saved' } | { outcome: 'refused'; reason: string } | { outcome: 'offline' };

export type DocState = 'loading' | 'ready' | 'unloading' | 'closed';
/** The server closes a connection that lost the right to read its room with 1008 (RFC 6455 "policy violation"). */
export const LOST_ACCESS_CLOSE = 1008;
/** The document was deleted (with its text or study): nothing to reconnect to; the local copy goes too. */
export const DELETED_CLOSE = 4404;
/**
 * The text was rebuilt under a new room by a de-identification purge: the copy here still holds the
 * removed words, so it is discarded (never sent back) and the page reloads onto the new room.
 */
export const REPLACED_CLOSE = 4410;
/**
 * What this person may read of the memos changed so that this copy lacks entries they may now read
 * (it was filtered for the old view): it is discarded and never sent back; whoever opened it is told
 * (`onViewChanged`) and opens a fresh copy for the new view, without reloading the page.
 */
export const VIEW_CHANGED_CLOSE = 4409;
const NO_RECONNECT = new Set([LOST_ACCESS_CLOSE, DELETED_CLOSE, REPLACED_CLOSE, VIEW_CHANGED_CLOSE]);
/** Survives the reload after a replaced document, so the next page can say why it reloaded. */
export const RELOAD_NOTICE_KEY = 'gloss-reload-notice';
export type LinkState = 'connecting' | 'connected' | 'disconnected' | 'paused';

export interface OpenDoc {
  room: string;
  label: string;
  doc: Y.Doc;
  provider: WebsocketProvider;
  state: Accessor<DocState>;
  link: Accessor<LinkState>;
  /** Local changes not yet sent (made while disconnected). */
  pending: Accessor<number>;
  /** Why the server took this document away (signed out, removed from the study…); null while it may be read. */
  lost: Accessor<string | null>;
  /** The server's words when it last refused a change to this document (not stored, not shared), else null. */
  refused: Accessor<string | null>;
  /** How many refusals this document has had since it opened (a repeated refusal with the same words still counts). */
  refusals: Accessor<number>;
  /**
   * Asks the server whether everything changed here so far was taken: resolves `saved` once the server
   * answered a sync request sent after those changes without refusing any of them (it handles one
   * connection's messages in order, and a change it takes is stored before anyone else sees it),
   * `refused` with its words when it refused, `offline` when there is no connection (the change waits
   * on this device and is sent on reconnecting).
   */
  confirm(): Promise<Confirmation>;
  /** Forgets the refusal message. */
  dismissRefusal(): void;
  /** Drops this device's copy of the document (with the refused change in it) and reloads the page. */
  discardLocalCopy(): Promise<void>;
  /** Stops syncing and deletes this device's copy, without reloading. */
  dropLocalCopy(): Promise<void>;
  /** Called once this copy was refused as made for another view (4409) and deleted: open a fresh one. */
  onViewChanged(listener: () => void): () => void;
  /** The server no longer gives this room (its opening left it out): stop syncing, say so, keep nothing of it. */
  withdraw(): void;
  /** Resolves once the document holds either the server's state or the offline copy. */
  whenReady: Promise<void>;
  release(): void;
  /** Closes regardless of other holders (sign-out); resolves once the offline copy's handle is shut. */
  closeNow(): Promise<void>;
}

interface Entry { handle: OpenDoc; refs: number }
const open = new Map<string, Entry>();

/**
 * A purge rebuilds every document of a study at once, so one 4410 means the others' copies are old too:
 * every open document stops sending and drops its copy on this device, then the page reloads once
 * (several reloads racing would leave some old copies, which still hold the removed words, behind).
 */
let discarding: Promise<void> | null = null;
function discardAllReplaced(first: OpenDoc): Promise<void> {
  discarding ??= (async () => {
    const handles = new Set([first, ...[...open.values()].map((e) => e.handle)]);
    await Promise.allSettled([...handles].map((h) => h.dropLocalCopy()));
    await reloadHold;
    location.reload();
  })();
  return discarding;
}

/** Work the reload after a purge waits for (the purge's own request, whose answer must not be lost). */
let reloadHold: Promise<unknown> = Promise.resolve();
export function holdReloadWhile<T>(work: Promise<T>): Promise<T> {
  reloadHold = Promise.allSettled([reloadHold, work]);
  return work;
}

/** The origin of a state from the opening request (sync/opening.ts): the server's, not a change made here. */
export const PRIMED = Symbol('opening');
/**
 * A state for a document: from the opening request, or (`kept`) the server's state as this device kept
 * it (kept-states.ts), which its offline copy need not store again.
 */
interface Primed { state: Uint8Array; kept: boolean }
/** States the opening request (or this device) brought for documents not open yet, by room; taken by the next openDoc. */
const primed = new Map<string, Primed[]>();
/** Applies a state that arrived for a document already open, and counts it ready. */
const primeOpen = new Map<string, (p: Primed) => void>();

/**
 * Applying a whole document's state is the longest piece of work in opening a text (a layer of 2,000
 * segments is ~280 kB): each runs in a task of its own, in the order asked, so the page can paint and
 * answer between them.
 */
const applyQueue: Array<() => void> = [];
/** applyQueue[0] is running (it is taken off the queue once done). */
let running = false;
function inOwnTask(work: () => void): void {
  applyQueue.push(work);
  if (applyQueue.length === 1) setTimeout(runNext, 0);
}
function runNext(): void {
  const work = applyQueue[0];
  if (!work) return; // emptied meanwhile (sign-out)
  running = true;
  try {
    work();
  } finally {
    running = false;
    applyQueue.shift();
    if (applyQueue.length > 0) setTimeout(runNext, 0);
  }
}

/**
 * Runs `work` in a task of its own ahead of the states still waiting to be applied: what follows an
 * applied state (drawing the text, laying out a layer's segments) then shows before the next state is
 * applied, instead of after all of them.
 */
export function nextInOwnTask(work: () => void): void {
  if (applyQueue.length === 0) return inOwnTask(work);
  applyQueue.splice(running ? 1 : 0, 0, work);
}

/**
 * Puts the server's state of `room` (from the opening request) into its document: soon if it is open,
 * else when it opens. The document then counts as ready, as with its offline copy; its socket exchanges
 * only what changed since.
 */
export function prime(room: string, state: Uint8Array, kept = false): void {
  const apply = primeOpen.get(room);
  if (apply) apply({ state, kept });
  else primed.set(room, [...(primed.get(room) ?? []), { state, kept }]);
}

/**
 * The server no longer gives `room` (its opening left it out): a state kept on this device and not yet
 * applied is dropped, and an open document stops syncing and says it may no longer be opened.
 */
export function withdraw(room: string): void {
  primed.delete(room);
  const e = open.get(room);
  if (e) e.handle.withdraw();
}

/**
 * Applies states of the server's to `doc` with its `update` listeners held back, then hands those
 * listeners the bytes that came (a valid update holding at least what was applied) instead of letting
 * Yjs encode every applied state once more for them (~0.8 s for five 2,000-segment layers at 30k words,
 * issue 11). The provider's listener is skipped (these are the server's own states: nothing to send it),
 * and so is the offline copy's for a state this device kept (it is on the device already); nothing is
 * handed on when the states brought nothing new.
 */
function applyQuietly(doc: Y.Doc, states: Primed[], skip: { provider: unknown; local: unknown }): void {
  const observers = (doc as unknown as { _observers: Map<string, Set<(...args: unknown[]) => void>> })._observers;
  const held = observers.get('update');
  observers.delete('update');
  let changed = false;
  const seen = (tr: Y.Transaction) => {
    if (tr.deleteSet.clients.size > 0) changed = true;
    for (const [client, clock] of tr.afterState) if ((tr.beforeState.get(client) ?? 0) !== clock) changed = true;
  };
  doc.on('afterTransaction', seen);
  try {
    for (const p of states) Y.applyUpdate(doc, p.state, PRIMED);
  } finally {
    doc.off('afterTransaction', seen);
    // listeners added meanwhile (by an observer) stay, with those held back
    const added = observers.get('update');
    const all = new Set([...(held ?? []), ...(added ?? [])]);
    if (all.size > 0) observers.set('update', all);
  }
  if (!changed) return;
  for (const f of observers.get('update') ?? []) {
    if (f === skip.provider) continue;
    for (const p of states) if (!(p.kept && f === skip.local)) f(p.state, PRIMED, doc, null);
  }
}

/** Forgets states primed for documents that were never opened (the screen went elsewhere). */
export function unprime(rooms: Iterable<string>): void {
  for (const room of rooms) primed.delete(room);
}

/**
 * The ticket the opening request got for this page's sockets: presented at each upgrade so the server
 * need not decide the room again (it decides afresh when the ticket no longer stands). '' for none.
 */
let ticket = '';
export function setSyncTicket(t: string): void {
  ticket = t;
  for (const { handle } of open.values()) handle.provider.params = { ...(viewOf.get(handle.room) ?? {}), ...(t ? { ticket: t } : {}) };
}
/** The memos view a document's copy was made for, sent with each connection (`memosView`), by room. */
const viewOf = new Map<string, { memosView: string }>();

/**
 * Chromium opens WebSocket connections to one host one at a time (each handshake waits for the one
 * before it, as RFC 6455 §4.1 allows), so every socket opened early delays the ones behind it. A
 * background document (say, the memos while a text opens) connects only once no foreground document
 * is still loading, or after BACKGROUND_AFTER_MS if one never finishes (offline).
 */
const BACKGROUND_AFTER_MS = 3000;
const foregroundLoading = new Set<string>();
const waitingBackground = new Set<() => void>();
function startBackground(): void {
  if (foregroundLoading.size > 0) return;
  const start = [...waitingBackground];
  waitingBackground.clear();
  start.forEach((f) => f());
}

/**
 * Closes every open document at once, whatever its reference count (sign-out): the sockets, the
 * IndexedDB handles (so the databases can be deleted) and the Y.Docs. Screens releasing later find nothing.
 */
export async function closeAllDocs(): Promise<void> {
  const entries = [...open.values()];
  open.clear();
  // nothing of this person's may reach whoever signs in next on this page
  primed.clear();
  closeKept();
  applyQueue.length = 0;
  ticket = '';
  await Promise.all(entries.map(({ handle }) => handle.closeNow()));
}

/** The key of the memos view whose copy this device keeps, per room (localStorage, `gloss:*`: sign-out forgets it). */
const VIEW_KEY = (room: string) => `gloss:memos-view:${room}`;
/** Deletes the copy kept for an earlier view of `room`, and remembers the view of the one kept now. */
function forgetOtherViews(room: string, view: string): void {
  const before = localStorage.getItem(VIEW_KEY(room));
  if (before !== null && before !== view) indexedDB.deleteDatabase(`gloss:${room}:${before}`);
  // a copy from before views existed holds whatever the server sent then
  if (before === null) indexedDB.deleteDatabase(`gloss:${room}`);
  localStorage.setItem(VIEW_KEY(room), view);
}

/** Stops and restarts syncing for every open document (the "work offline" switch). */
let paused = false;
export function setPaused(p: boolean): void {
  paused = p;
  for (const { handle } of open.values()) {
    if (p) handle.provider.disconnect();
    else handle.provider.connect();
  }
}
export const isPaused = (): boolean => paused;

/**
 * `offline: false` keeps no IndexedDB copy: for documents this person only reads (other coders' layers),
 * which need not survive a lost connection and would cost storage and time on every open.
 */
/**
 * `view` (the memos only): the server's key for what this person may read of the document. The offline
 * copy is kept under it (a copy filtered for another view lacks entries and is never synced again; the
 * old one is deleted), and each connection names it so the server refuses a stale copy (4409).
 */
export function openDoc(room: string, opts: { label: string; gc?: boolean; offline?: boolean; background?: boolean; holdUntil?: Promise<unknown>; view?: string }): OpenDoc {
  const existing = open.get(room);
  if (existing) {
    existing.refs++;
    return existing.handle;
  }
  // Text documents are opened with gc:false so anchors into deleted text still resolve (DESIGN §2).
  const doc = new Y.Doc({ gc: opts.gc ?? true });
  const early = primed.get(room);
  primed.delete(room);
  if (opts.view !== undefined) {
    viewOf.set(room, { memosView: opts.view });
    forgetOtherViews(room, opts.view);
  } else viewOf.delete(room);
  const local = opts.offline === false ? null : new IndexeddbPersistence(opts.view !== undefined ? `gloss:${room}:${opts.view}` : `gloss:${room}`, doc);
  const defer = opts.background === true && foregroundLoading.size > 0;
  const provider = new WebsocketProvider(syncBaseUrl(), room, doc, {
    // with a state from the opening request, connect once it is applied: the first sync message then
    // carries its state vector and the server sends only what changed since
    // `holdUntil` (the opening request in flight): the offline copy loads meanwhile, the socket waits
    // for the state and the ticket the request brings
    connect: !paused && !defer && !early && !opts.holdUntil,
    params: { ...(viewOf.get(room) ?? {}), ...(ticket ? { ticket } : {}) },
    maxBackoffTime: 2500,
    // No BroadcastChannel between this device's tabs: on every connect it encoded each document's whole
    // state for tabs that mostly are not there (seven full encodes, hundreds of ms, while a long text
    // opened: issue 11). Tabs still meet through the server, which is also the one to decide whether a
    // change is kept before another tab shows it.
    disableBc: true,
    // Access taken away is not a network problem: reconnecting would only be refused again.
    shouldReconnect: (event: CloseEvent) => !NO_RECONNECT.has(event.code),
  });
  let released = false;
  /** The server no longer gives this room (`withdraw`): never connect again. */
  let withdrawn = false;
  let closing: Promise<void> = Promise.resolve();
  if (defer) {
    const start = () => {
      waitingBackground.delete(start);
      clearTimeout(timer);
      if (!released && !paused && !provider.shouldConnect) provider.connect();
    };
    const timer = setTimeout(start, BACKGROUND_AFTER_MS);
    waitingBackground.add(start);
  }
  const viewChanged = new Set<() => void>();
  const [state, setState] = createSignal<DocState>('loading');
  const [link, setLink] = createSignal<LinkState>(paused ? 'paused' : 'connecting');
  const [pending, setPendingSig] = createSignal(readPending(room));
  const [lost, setLost] = createSignal<string | null>(null);
  provider.on('connection-close', (event: CloseEvent | null) => {
    if (event?.code === LOST_ACCESS_CLOSE) {
      setLost(event.reason || 'You may no longer open this document.');
      void forgetKept([room]);
    }
    if (event?.code === DELETED_CLOSE) {
      setLost(event.reason || 'This document was deleted.');
      void local?.clearData();
      void forgetKept([room]);
    }
    if (event?.code === REPLACED_CLOSE) {
      sessionStorage.setItem(RELOAD_NOTICE_KEY, `${opts.label}: ${event.reason || 'the text was rebuilt after de-identification'} This device’s copy was discarded and the page reloaded.`);
      void discardAllReplaced(handle);
    }
    if (event?.code === VIEW_CHANGED_CLOSE) {
      // the copy is stopped and deleted first, so nothing of it can reach the server again
      void handle.dropLocalCopy().then(() => {
        for (const listener of viewChanged) listener();
      });
    }
  });
  const [refused, setRefusedSig] = createSignal<string | null>(null);
  const [refusals, setRefusals] = createSignal(0);
  // confirm() callers waiting for the answer to their sync request, oldest first
  const waiting: Array<(c: Confirmation) => void> = [];
  const setRefused = (reason: string) => {
    setRefusedSig(reason);
    setRefusals((n) => n + 1);
    for (const w of waiting.splice(0)) w({ outcome: 'refused', reason });
  };
  provider.on('connection-close', () => {
    for (const w of waiting.splice(0)) w({ outcome: 'offline' });
  });
  const handlers = (provider as unknown as { messageHandlers: Array<(e: unknown, d: decoding.Decoder, ...rest: unknown[]) => void> }).messageHandlers;
  const syncHandler = handlers[0]!;
  handlers[0] = (encoder, decoder, ...rest) => {
    // a sync step 2 from the server only ever answers a sync step 1 of ours (its own greeting is a step 1)
    const kind = decoding.peekVarUint(decoder);
    syncHandler(encoder, decoder, ...rest);
    if (kind === syncProtocol.messageYjsSyncStep2) waiting.shift()?.({ outcome: 'saved' });
  };
  // y-websocket only logs a permission-denied message (type 2); keep its words so the status bar can
  // tell the person that their change was not saved (nothing is dropped without a word).
  // The server answers every read-only connection's sync step 2 with "read-only", written or not: that
  // is only news once this person changed the document here.
  let wroteHere = false;
  (provider as unknown as { messageHandlers: Array<(e: unknown, d: decoding.Decoder) => void> }).messageHandlers[2] = (_e, d) => {
    if (decoding.readVarUint(d) !== 0) return;
    const reason = decoding.readVarString(d);
    if (reason !== 'read-only' || wroteHere) setRefused(reason === 'read-only' ? 'you may only read this document.' : reason);
  };
  const setPending = (n: number) => {
    setPendingSig(n);
    writePending(room, n);
  };

  provider.on('status', (e: { status: string }) => {
    setLink(e.status === 'connected' ? 'connected' : paused ? 'paused' : e.status === 'connecting' ? 'connecting' : 'disconnected');
  });
  provider.on('sync', (synced: boolean) => {
    // After sync step 2 both sides hold each other's state: nothing local is waiting any more.
    if (synced) {
      setPending(0);
      setState((s) => (s === 'loading' ? 'ready' : s));
    }
  });
  doc.on('update', (_u: Uint8Array, origin: unknown) => {
    if (origin === provider || origin === PRIMED || (local && origin === local)) return;
    wroteHere = true;
    if (!provider.wsconnected || !provider.synced) setPending(pending() + 1);
  });

  let cleanupForeground: (() => void) | undefined;
  const whenReady = new Promise<void>((resolve) => {
    let done = false;
    const finish = () => {
      if (done) return;
      done = true;
      setState((s) => (s === 'loading' ? 'ready' : s));
      resolve();
    };
    provider.once('sync', (s: boolean) => {
      if (!s) return;
      performance.mark(`gloss:synced:${room}`);
      finish();
    });
    // Offline: the IndexedDB copy is good enough to work on if it holds anything.
    void local?.whenSynced.then(() => {
      if (doc.store.clients.size > 0 && !provider.wsconnected) finish();
    });
    // The opening request's state is the server's as of a moment ago (a kept one, as of the last
    // opening): ready to draw, the socket follows.
    const applyPrimed = (states: Primed[], connect: boolean) =>
      inOwnTask(() => {
        if (released) return;
        applyQuietly(doc, states, { provider: (provider as unknown as { _updateHandler: unknown })._updateHandler, local: (local as unknown as { _storeUpdate?: unknown } | null)?._storeUpdate });
        performance.mark(`gloss:primed:${room}`);
        finish();
        if (connect && !withdrawn && !paused && !defer && !provider.shouldConnect) provider.connect();
      });
    // A kept state of a document with an offline copy: that copy holds the server's states this device
    // received too, so the kept one is applied only when the copy turns out empty (decoding a 2,000-segment
    // layer twice cost ~0.2 s), or holds differences of the request's without what they follow. Should
    // the copy lack something (a write lost as the tab closed), the socket's own sync step sends it: it
    // asks with the document's real state vector.
    const primeStates = (states: Primed[], connect: boolean) => {
      const kept = local ? states.filter((p) => p.kept) : [];
      const rest = local ? states.filter((p) => !p.kept) : states;
      if (kept.length > 0) {
        void local!.whenSynced.then(() => {
          // empty, or holding only differences that wait for what they follow
          if (!released && (doc.store.clients.size === 0 || doc.store.pendingStructs !== null)) applyPrimed(kept, false);
        });
      }
      if (rest.length > 0) applyPrimed(rest, connect);
      else if (connect) inOwnTask(() => !released && !withdrawn && !paused && !defer && !provider.shouldConnect && provider.connect());
    };
    // a state from the request: connect once it is applied (a kept one waits for the request: `holdUntil`)
    if (early) primeStates(early, early.some((p) => !p.kept) || !opts.holdUntil);
    primeOpen.set(room, (p) => primeStates([p], false));
    // after the states the request primed (queued before this, so applied first), connect
    void opts.holdUntil?.finally(() =>
      inOwnTask(() => {
        if (!released && !withdrawn && !paused && !defer && !provider.shouldConnect) provider.connect();
      }),
    );
  });

  if (opts.background !== true) {
    foregroundLoading.add(room);
    const settled = () => {
      foregroundLoading.delete(room);
      startBackground();
    };
    void whenReady.then(settled);
    cleanupForeground = settled;
  }

  const handle: OpenDoc = {
    room,
    label: opts.label,
    doc,
    provider,
    state,
    link,
    pending,
    lost,
    refused,
    refusals,
    confirm() {
      if (!provider.wsconnected || !provider.synced || !provider.ws) return Promise.resolve({ outcome: 'offline' });
      return new Promise<Confirmation>((resolve) => {
        waiting.push(resolve);
        const encoder = encoding.createEncoder();
        encoding.writeVarUint(encoder, 0); // y-websocket's messageSync
        syncProtocol.writeSyncStep1(encoder, doc);
        provider.ws!.send(encoding.toUint8Array(encoder));
      });
    },
    dismissRefusal: () => setRefusedSig(null),
    async discardLocalCopy() {
      await handle.dropLocalCopy();
      location.reload();
    },
    onViewChanged(listener) {
      viewChanged.add(listener);
      return () => viewChanged.delete(listener);
    },
    async dropLocalCopy() {
      provider.disconnect();
      await Promise.all([local?.clearData(), forgetKept([room])]);
    },
    withdraw() {
      if (released) return;
      withdrawn = true;
      provider.disconnect();
      setLost('You may no longer open this document.');
      void forgetKept([room]);
    },
    whenReady,
    release() {
      const e = open.get(room);
      if (!e || e.handle !== handle || --e.refs > 0) return;
      open.delete(room);
      void handle.closeNow();
    },
    closeNow() {
      if (released) return closing;
      released = true;
      primeOpen.delete(room);
      cleanupForeground?.();
      setState('unloading');
      unregisterDoc(handle);
      provider.destroy();
      closing = (local ? local.destroy() : Promise.resolve()).finally(() => {
        doc.destroy();
        setState('closed');
      });
      return closing;
    },
  };
  open.set(room, { handle, refs: 1 });
  registerDoc(handle);
  return handle;
}
