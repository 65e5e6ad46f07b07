/**
 * Live copies of recently read texts for `GET /api/texts/:id/segments` (issue 11 item 4): the text,
 * codebook and layer documents stay loaded, each request first applies what the log gained since (one
 * indexed read per document), the flags come from one FlagEngine per group of layers that refreshes
 * only what the change touched (its changes patch each segment's flag kinds: flag-kinds.ts), each
 * layer keeps its rows of JSON bytes (answer-rows.ts: a change remakes the touched layers' rows and
 * merges all of them into one buffer), and the answer is kept as long as no document moved. Loading
 * the documents and computing every flag afresh cost ~0.6 s on a 30,000-word text with 10,000
 * segments; a repeat costs the freshness reads, a change the incremental refresh.
 *
 * Bounded: at most `maxTexts` texts (least recently used goes first) and none idle longer than
 * `idleMs`, so a server at rest holds none of this. Reads come from the shared log, so answers are as
 * fresh on every node. Sequence numbers are taken at insert, not commit, so the read cursor trails by
 * one read, as the sync rooms' catch-up does (sync/room.ts).
 */
import { createCodebookDoc, decodeAnchors, FlagEngine, listSegments, segmentAnchors, type DecodedAnchors, type LayerSource, type SegmentRecord } from '@gloss/model';
import * as Y from 'yjs';
import type { CoderChoice } from '../agreement/coders.js';
import type { VisibleLayer } from '../http/text-layers.js';
import type { UpdateStore } from '../sync/contracts.js';
import { joinRows, rowsFor, type Joined, type LayerRows } from './answer-rows.js';
import { FlagKinds } from './flag-kinds.js';
import { flagGroups, resolveRecords, segmentsWithFlags, type LayerResolution } from './with-flags.js';

const MAX_ANSWERS = 8;

export type TextCacheStore = Pick<UpdateStore, 'load' | 'since'>;

export interface TextCacheOptions {
  store: TextCacheStore;
  /** Texts kept (default 4). */
  maxTexts?: number;
  /** A text unread this long is dropped (default 5 minutes). */
  idleMs?: number;
  now?: () => number;
  /**
   * Answer as before the kept rows (segmentsWithFlags' objects, sorted and stringified on every change):
   * the in-run reference of `pnpm bench segments`, and nothing else.
   */
  previous?: boolean;
}

/** One document kept current from the log. */
class LiveDoc {
  readonly doc = new Y.Doc({ gc: false });
  /** Bumped whenever something new was applied: part of the answer's key. */
  version = 0;
  /** For a layer: its records and their resolution, as of this version and the text's version then. */
  resolution: { version: number; textVersion: number; value: LayerResolution } | null = null;
  /** For a layer: its segment records and their anchors read, as of this version (a text correction changes neither). */
  records: { version: number; value: SegmentRecord[]; decoded: DecodedAnchors } | null = null;
  /** For a layer: the answer's rows made from that resolution (answer-rows.ts). */
  rows: LayerRows | null = null;
  private cursor = 0;
  private lastHigh = 0;
  private readonly applied = new Set<number>();
  private loaded = false;

  constructor(
    private readonly store: TextCacheStore,
    readonly id: string,
  ) {}

  async refresh(): Promise<void> {
    if (!this.loaded) {
      const { updates, seq } = await this.store.load(this.id);
      this.doc.transact(() => {
        for (const u of updates) Y.applyUpdate(this.doc, u);
      });
      this.loaded = true;
      this.cursor = this.lastHigh = seq;
      this.version++;
      return;
    }
    const { updates, seq, seqs } = await this.store.since(this.id, this.cursor);
    // A snapshot (seqs entry 0, after a fold) or a row not applied yet: Yjs ignores what it already has.
    const missing = seqs === undefined ? updates : updates.filter((_, i) => seqs[i] === 0 || !this.applied.has(seqs[i]!));
    if (missing.length > 0) {
      this.doc.transact(() => {
        for (const u of missing) Y.applyUpdate(this.doc, u);
      });
      this.version++;
    }
    if (seqs !== undefined) for (const s of seqs) if (s > 0) this.applied.add(s);
    this.cursor = Math.min(this.lastHigh, seq);
    this.lastHigh = Math.max(this.lastHigh, seq);
    for (const s of this.applied) if (s <= this.cursor) this.applied.delete(s);
  }

  destroy(): void {
    this.doc.destroy();
  }
}

interface Entry {
  textDocId: string;
  codebookId: string | null;
  docs: Map<string, LiveDoc>;
  /** One engine (and its segments' kinds) per group of flagged layers; rebuilt when the group's layers change. */
  engines: Map<string, { layers: string; kinds: FlagKinds }>;
  /** By view: the answer's bytes for these documents' versions, and how they were joined (lent to the next join of the view). */
  answers: Map<string, { versions: string; body: Buffer<ArrayBuffer>; count: number; joined: Joined | null }>;
  emptyCodebook: Y.Doc | null;
  lastUsed: number;
  /** Requests for one text take turns: the documents are shared. */
  turn: Promise<unknown>;
}

export interface SegmentsAnswer {
  /** The JSON array of SegmentOut, as UTF-8 (kept answers are sent as they are, never re-encoded). */
  body: Buffer<ArrayBuffer>;
  count: number;
  /** How the answer was made: kept as it was, refreshed after changes, or built from the log. */
  source: 'kept' | 'refreshed' | 'loaded';
  /** Milliseconds spent reading the log, computing the segments and flags, and writing the JSON. */
  timings: { refresh: number; compute: number; json: number };
}

export interface TextCache {
  segments(q: { textId: string; textDocId: string; codebookId: string | null; layers: VisibleLayer[]; choice?: CoderChoice }): Promise<SegmentsAnswer>;
  /** Texts held now. */
  readonly size: number;
  clear(): void;
}

export function createTextCache(o: TextCacheOptions): TextCache {
  const maxTexts = o.maxTexts ?? 4;
  const idleMs = o.idleMs ?? 5 * 60_000;
  const now = o.now ?? Date.now;
  const entries = new Map<string, Entry>();
  let sweep: NodeJS.Timeout | null = null;

  const drop = (textId: string) => {
    const e = entries.get(textId);
    if (!e) return;
    entries.delete(textId);
    for (const { kinds } of e.engines.values()) kinds.engine.destroy();
    for (const d of e.docs.values()) d.destroy();
    e.emptyCodebook?.destroy();
  };
  const dropIdle = () => {
    const cutoff = now() - idleMs;
    for (const [id, e] of entries) if (e.lastUsed < cutoff) drop(id);
    if (entries.size === 0 && sweep) {
      clearInterval(sweep);
      sweep = null;
    }
  };

  function entryFor(textId: string, textDocId: string, codebookId: string | null): Entry {
    let e = entries.get(textId);
    // A purge gives the text a new document: start over.
    if (e && (e.textDocId !== textDocId || e.codebookId !== codebookId)) {
      drop(textId);
      e = undefined;
    }
    if (!e) {
      while (entries.size >= maxTexts) drop([...entries.entries()].sort((a, b) => a[1].lastUsed - b[1].lastUsed)[0]![0]);
      e = { textDocId, codebookId, docs: new Map(), engines: new Map(), answers: new Map(), emptyCodebook: null, lastUsed: now(), turn: Promise.resolve() };
      entries.set(textId, e);
      if (!sweep) {
        sweep = setInterval(dropIdle, Math.max(1_000, Math.min(idleMs, 60_000)));
        sweep.unref();
      }
    }
    e.lastUsed = now();
    return e;
  }

  async function answer(e: Entry, layers: VisibleLayer[], choice: CoderChoice): Promise<SegmentsAnswer> {
    const ids = [e.textDocId, ...layers.map((l) => l.layerDocId), ...(e.codebookId ? [e.codebookId] : [])];
    let fresh = false;
    const live = ids.map((id) => {
      let d = e.docs.get(id);
      if (!d) {
        e.docs.set(id, (d = new LiveDoc(o.store, id)));
        fresh = true;
      }
      return d;
    });
    const t0 = performance.now();
    await Promise.all(live.map((d) => d.refresh()));
    const t1 = performance.now();
    const key = JSON.stringify([layers.map((l) => [l.layerDocId, l.coderId, l.roundId ?? null]), choice]);
    const versions = live.map((d) => d.version).join(',');
    const kept = e.answers.get(key);
    if (kept && kept.versions === versions) return { body: kept.body, count: kept.count, source: 'kept', timings: { refresh: t1 - t0, compute: 0, json: 0 } };

    const textDoc = e.docs.get(e.textDocId)!.doc;
    const codebook = e.codebookId ? e.docs.get(e.codebookId)!.doc : (e.emptyCodebook ??= createCodebookDoc());
    // Each layer's records stay while it did not move, its resolution while neither it nor the text did:
    // a new segment re-reads and re-resolves one layer; a text correction re-resolves them all, in one walk.
    const textVersion = e.docs.get(e.textDocId)!.version;
    const withDocs = layers.map((l) => ({ ...l, doc: e.docs.get(l.layerDocId)!.doc }));
    const docs = layers.map((l) => e.docs.get(l.layerDocId)!);
    const stale = docs.map((d, i) => [d, i] as const).filter(([d]) => d.resolution?.version !== d.version || d.resolution.textVersion !== textVersion);
    if (stale.length > 0) {
      const held = stale.map(([d]) => {
        if (d.records?.version === d.version) return d.records;
        const value = listSegments(d.doc);
        return (d.records = { version: d.version, value, decoded: decodeAnchors(segmentAnchors(value)) });
      });
      const fresh = resolveRecords(textDoc, held.map((r) => r.value), held.map((r) => r.decoded));
      stale.forEach(([d], k) => (d.resolution = { version: d.version, textVersion, value: fresh[k]! }));
    }
    const perLayer = docs.map((d) => d.resolution!.value);
    const used = new Set<string>();
    const engineOf = (key: string, sources: LayerSource[]): FlagKinds => {
      used.add(key);
      const names = sources.map((s) => `${s.layerId}=${s.coder}`).join(',');
      let g = e.engines.get(key);
      if (g && g.layers !== names) {
        g.kinds.engine.destroy();
        g = undefined;
      }
      if (!g) e.engines.set(key, (g = { layers: names, kinds: new FlagKinds(new FlagEngine({ textDoc, codebook, layers: sources })) }));
      return g.kinds;
    };
    let made: { body: Buffer<ArrayBuffer>; count: number; joined: Joined | null };
    let t2: number;
    if (o.previous) {
      // the previous answer: objects, flagged, sorted and stringified afresh; encoded as sending a string does
      const out = segmentsWithFlags(textDoc, codebook, withDocs, choice, (key, sources) => engineOf(key, sources).engine.flags(), () => perLayer);
      t2 = performance.now();
      made = { body: Buffer.from(JSON.stringify(out), 'utf8'), count: out.length, joined: null };
    } else {
      // The rows of a layer whose resolution is new are remade, lending what did not change.
      const rows = docs.map((d, i) => (d.rows = rowsFor(d.rows, layers[i]!, perLayer[i]!.resolved)));
      const kindsOf = new Map<string, FlagKinds>();
      for (const { key, sources } of flagGroups(withDocs, perLayer, choice)) {
        const kinds = engineOf(key, sources);
        kinds.update();
        for (const s of sources) kindsOf.set(s.layerId, kinds);
      }
      t2 = performance.now();
      const joined = joinRows(rows, (layerId) => kindsOf.get(layerId)?.layer(layerId), kept?.joined);
      made = { body: joined.body, count: joined.count, joined };
    }
    for (const [group, g] of e.engines) {
      if (!used.has(group)) {
        g.kinds.engine.destroy();
        e.engines.delete(group);
      }
    }
    const { body, count, joined } = made;
    const t3 = performance.now();
    e.answers.delete(key);
    e.answers.set(key, { versions, body, count, joined });
    // One answer per distinct view (role, layers, choice); a handful at most is worth keeping.
    while (e.answers.size > MAX_ANSWERS) e.answers.delete(e.answers.keys().next().value!);
    return { body, count, source: fresh ? 'loaded' : 'refreshed', timings: { refresh: t1 - t0, compute: t2 - t1, json: t3 - t2 } };
  }

  return {
    segments(q) {
      const e = entryFor(q.textId, q.textDocId, q.codebookId);
      const run = e.turn.then(() => answer(e, q.layers, q.choice ?? {}));
      e.turn = run.catch(() => undefined);
      return run.catch((err: unknown) => {
        // A failed read may leave a document half refreshed: start this text over next time.
        drop(q.textId);
        throw err;
      });
    },
    get size() {
      return entries.size;
    },
    clear() {
      for (const id of [...entries.keys()]) drop(id);
    },
  };
}
