/**
 * The server's states of the documents a text's opening delivered, kept on this device (IndexedDB
 * `gloss:opening`, so sign-out forgets it with the offline copies: forget.ts deletes every `gloss:*`
 * database), so a second open of the text draws from them before its opening request returns, and the
 * request carries their state vectors and brings only what changed since (issue 11 item 1).
 *
 * What is kept is only ever what the server sent: a room's updates (the whole state it once sent, then
 * each difference that brought something) and the state vector the server said they add up to, written
 * together in one transaction, so the state vector sent never claims more than the updates hold (the
 * server would then leave out what the copy lacks). The rooms kept for a text are the rooms its last
 * opening gave: a room the server no longer gives (an independent round began, the person was removed)
 * is deleted when an opening leaves it out, or a sync connection is refused it (open-doc). The memos are
 * not kept here (their copy is filtered for one view; they have an offline copy of their own).
 */
import * as Y from 'yjs';

const DB_NAME = 'gloss:opening';
/** Room -> { room, updates: Uint8Array[], deletes?: Uint8Array } */
const ROOMS = 'rooms';
/** Room -> { room, sv: Uint8Array }: small, read first so the request need not wait for the states. */
const VECTORS = 'vectors';
/** Text id -> { textId, rooms: string[] } */
const TEXTS = 'texts';
/** More updates than this for a room are merged into one when the next is written. */
const MERGE_AFTER = 16;

interface RoomRecord {
  room: string;
  /** The server's updates, oldest first; applied in order they give the state `sv` describes. */
  updates: Uint8Array[];
  /**
   * The last difference that brought no new item, only the delete set (every difference carries the
   * whole delete set, which only grows): replaced, not appended, so unchanged rooms do not pile up.
   */
  deletes?: Uint8Array;
}

export interface KeptText {
  /** The state vector of each kept room of the text (what the request sends). */
  vectors: Map<string, Uint8Array>;
  /** The kept updates of each room, in order: resolves after `vectors`. */
  states: Promise<Map<string, Uint8Array[]>>;
}

export interface GivenDoc {
  room: string;
  kind: string;
  state: Uint8Array;
  diff?: boolean | undefined;
  stateVector?: Uint8Array | undefined;
}

/**
 * Set (localStorage, `gloss:*`: sign-out forgets it) once something is kept for a text, so a first open
 * does not wait for IndexedDB to open (and be created) before its request goes out: that cost 0.1-0.8 s
 * on the loaded bench machine. A mark without a store only means one empty read.
 */
const MARK = (textId: string) => `gloss:kept:${textId}`;
function mark(textId: string, on: boolean): void {
  try {
    if (on) localStorage.setItem(MARK(textId), '1');
    else localStorage.removeItem(MARK(textId));
  } catch {
    // storage full or disabled: the next open reads IndexedDB (or not), nothing else changes
  }
}
function marked(textId: string): boolean {
  try {
    return localStorage.getItem(MARK(textId)) !== null;
  } catch {
    return true;
  }
}

let dbPromise: Promise<IDBDatabase | null> | null = null;
/** Raised by `closeKept` (sign-out): work started before it writes nothing after. */
let generation = 0;

function openDb(): Promise<IDBDatabase | null> {
  if (typeof indexedDB === 'undefined') return Promise.resolve(null);
  dbPromise ??= new Promise<IDBDatabase | null>((resolve) => {
    const req = indexedDB.open(DB_NAME, 1);
    req.onupgradeneeded = () => {
      const db = req.result;
      for (const [name, keyPath] of [[ROOMS, 'room'], [VECTORS, 'room'], [TEXTS, 'textId']] as const) {
        if (!db.objectStoreNames.contains(name)) db.createObjectStore(name, { keyPath });
      }
    };
    req.onsuccess = () => {
      const db = req.result;
      // sign-out deletes the database: let it go at once
      db.onversionchange = () => {
        db.close();
        dbPromise = null;
      };
      resolve(db);
    };
    req.onerror = () => resolve(null);
    req.onblocked = () => resolve(null);
  });
  return dbPromise;
}

/** Closes the store (sign-out, before its database is deleted); nothing started before writes after. */
export function closeKept(): void {
  generation++;
  const p = dbPromise;
  dbPromise = null;
  void p?.then((db) => db?.close());
}

const request = <T>(r: IDBRequest<T>): Promise<T> =>
  new Promise((resolve, reject) => {
    r.onsuccess = () => resolve(r.result);
    r.onerror = () => reject(r.error ?? new Error('IndexedDB request failed'));
  });

/** What this device keeps of `textId`'s rooms; empty when nothing (or IndexedDB is unavailable). */
export async function readKept(textId: string): Promise<KeptText> {
  const none: KeptText = { vectors: new Map(), states: Promise.resolve(new Map()) };
  if (!marked(textId)) return none;
  try {
    const db = await openDb();
    if (!db) return none;
    const tx = db.transaction([TEXTS, VECTORS, ROOMS], 'readonly');
    const text = (await request(tx.objectStore(TEXTS).get(textId))) as { rooms: string[] } | undefined;
    if (!text || text.rooms.length === 0) return none;
    // the small state vectors first (requests in a transaction complete in the order made), then the states
    const vectorReqs = text.rooms.map((room) => request(tx.objectStore(VECTORS).get(room)) as Promise<{ room: string; sv: Uint8Array } | undefined>);
    const roomReqs = text.rooms.map((room) => request(tx.objectStore(ROOMS).get(room)) as Promise<RoomRecord | undefined>);
    const states = Promise.all(roomReqs).then((records) => {
      const out = new Map<string, Uint8Array[]>();
      for (const r of records) if (r) out.set(r.room, r.deletes ? [...r.updates, r.deletes] : r.updates);
      return out;
    });
    // (a room's state vector and its updates are only ever written and deleted together)
    const vectors = new Map<string, Uint8Array>();
    for (const v of await Promise.all(vectorReqs)) if (v) vectors.set(v.room, v.sv);
    return { vectors, states: states.catch(() => new Map<string, Uint8Array[]>()) };
  } catch (err) {
    console.warn('could not read the states kept on this device', err);
    return none;
  }
}

/** Whether a Yjs update (v1) adds no item: only a delete set. */
function noNewItems(update: Uint8Array): boolean {
  return Y.decodeUpdate(update).structs.length === 0;
}

/**
 * Keeps what an opening gave for `textId`: whole states replace a room's copy, differences are added to
 * it (one that brings no item replaces the last such), with the state vector the server sent; rooms
 * kept for the text that the opening left out are deleted (the server no longer gives them).
 * `started`: the `keptGeneration()` when the request was made (a sign-out since: nothing is written).
 */
export async function keepOpening(textId: string, docs: GivenDoc[], started: number): Promise<void> {
  try {
    const db = await openDb();
    if (!db || started !== generation) return;
    const tx = db.transaction([TEXTS, VECTORS, ROOMS], 'readwrite');
    const rooms = tx.objectStore(ROOMS);
    const vectors = tx.objectStore(VECTORS);
    const texts = tx.objectStore(TEXTS);
    const keep = docs.filter((d) => d.kind !== 'memos' && d.stateVector !== undefined);
    const before = ((await request(texts.get(textId))) as { rooms: string[] } | undefined)?.rooms ?? [];
    for (const room of before) {
      if (keep.some((d) => d.room === room)) continue;
      rooms.delete(room);
      vectors.delete(room);
    }
    for (const d of keep) {
      // a copy of the bytes: a view into the response would store the whole response with each room
      const state = d.state.slice();
      if (!d.diff) {
        rooms.put({ room: d.room, updates: [state] } satisfies RoomRecord);
        vectors.put({ room: d.room, sv: d.stateVector!.slice() });
        continue;
      }
      const old = (await request(rooms.get(d.room))) as RoomRecord | undefined;
      // a difference against a copy that is gone (another tab forgot it meanwhile) cannot be kept alone
      if (!old) {
        vectors.delete(d.room);
        continue;
      }
      let next: RoomRecord;
      if (noNewItems(state)) {
        if (old.deletes && sameBytes(old.deletes, state)) continue;
        next = { room: d.room, updates: old.updates, deletes: state };
      } else {
        const updates = [...old.updates, state];
        next = { room: d.room, updates: updates.length > MERGE_AFTER ? [Y.mergeUpdates(updates)] : updates };
      }
      rooms.put(next);
      vectors.put({ room: d.room, sv: d.stateVector!.slice() });
    }
    texts.put({ textId, rooms: keep.map((d) => d.room) });
    await new Promise<void>((resolve, reject) => {
      tx.oncomplete = () => resolve();
      tx.onerror = () => reject(tx.error ?? new Error('IndexedDB transaction failed'));
      tx.onabort = () => reject(tx.error ?? new Error('IndexedDB transaction aborted'));
    });
    if (started === generation) mark(textId, keep.length > 0);
  } catch (err) {
    console.warn('could not keep the opening on this device', err);
  }
}

/** Deletes what is kept of these rooms (access refused, the document deleted or rebuilt). */
export async function forgetKept(roomsToForget: Iterable<string>): Promise<void> {
  const list = [...roomsToForget];
  if (list.length === 0) return;
  try {
    const db = await openDb();
    if (!db) return;
    const tx = db.transaction([VECTORS, ROOMS], 'readwrite');
    for (const room of list) {
      tx.objectStore(VECTORS).delete(room);
      tx.objectStore(ROOMS).delete(room);
    }
    await new Promise<void>((resolve, reject) => {
      tx.oncomplete = () => resolve();
      tx.onerror = () => reject(tx.error ?? new Error('IndexedDB transaction failed'));
    });
  } catch (err) {
    console.warn('could not forget a kept state', err);
  }
}

/** Deletes everything kept for a text (its opening was refused: the person may not read it). */
export async function forgetKeptText(textId: string): Promise<void> {
  mark(textId, false);
  try {
    const db = await openDb();
    if (!db) return;
    const tx = db.transaction([TEXTS], 'readonly');
    const rooms = ((await request(tx.objectStore(TEXTS).get(textId))) as { rooms: string[] } | undefined)?.rooms ?? [];
    await forgetKept(rooms);
    const del = db.transaction([TEXTS], 'readwrite');
    del.objectStore(TEXTS).delete(textId);
  } catch (err) {
    console.warn('could not forget a kept text', err);
  }
}

/** The current generation (see `keepOpening`). */
export const keptGeneration = (): number => generation;

function sameBytes(a: Uint8Array, b: Uint8Array): boolean {
  if (a.byteLength !== b.byteLength) return false;
  for (let i = 0; i < a.byteLength; i++) if (a[i] !== b[i]) return false;
  return true;
}
