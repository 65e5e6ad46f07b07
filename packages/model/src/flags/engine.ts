import * as Y from 'yjs';
import { getText } from '../text-doc.js';
import { resolveAnchors } from '../resolve.js';
import { getSegmentsMap, readSegment, type SegmentRecord } from '../layer-doc.js';
import { CODES_ROOT, CHANGES_ROOT, EXCLUSIVE_ROOT, META_ROOT } from '../codebook-doc.js';
import { FIELD_EDITS_ROOT } from '../field-edits.js';
import { ConflictError, NotFoundError } from '../errors.js';
import { readCodebookFacts, type CodebookFacts } from './codebook-facts.js';
import { definitionRaceFlags } from './definition-race.js';
import { IntervalIndex } from './interval-index.js';
import { overlapFlags, singleSegmentFlags, type RuleOptions } from './rules.js';
import { segKey, type Flag, type FlagSegment } from './types.js';
import { mapRange, type TextDelta } from './text-delta.js';

export interface LayerSource {
  layerId: string;
  /** The coder who owns the layer (disagreement compares coders). */
  coder: string;
  doc: Y.Doc;
}

export interface FlagEngineOptions {
  textDoc: Y.Doc;
  codebook: Y.Doc;
  layers?: LayerSource[];
  independentCoding?: boolean;
}

/** What one refresh changed, for a client that redraws only that. */
export interface FlagChanges {
  added: Flag[];
  removed: string[];
}

interface Entry {
  src: LayerSource;
  rec: SegmentRecord;
  seg: FlagSegment;
}

/**
 * Live flags for one text: the visible layers and the study's codebook. The engine observes the
 * documents and marks what each change touched; `refresh()` (called by `flags()`) then re-evaluates
 * only the flags owned by the touched segments and their overlap neighbours, before and after.
 *
 * A text edit moves every offset, but by one monotone map: the engine maps each segment through the
 * edit's delta and re-resolves (against Yjs items) only endpoints at an edit point (see text-delta.ts),
 * so an edit costs a pass over the segments plus a little work where it happened. Flags carry no
 * offsets, so moved-but-untouched segments keep their flags as they are.
 */
export class FlagEngine {
  private readonly textDoc: Y.Doc;
  private readonly codebook: Y.Doc;
  private readonly layers = new Map<string, { src: LayerSource; unobserve: () => void }>();
  private opts: RuleOptions;
  private entries = new Map<string, Entry>();
  private index = IntervalIndex.build([]);
  private facts: CodebookFacts;
  private flagMap = new Map<string, Flag>();
  private owned = new Map<string, Set<string>>();
  private raceFlags = new Map<string, Flag>();
  private full = true;
  private textDeltas: TextDelta[] = [];
  private changedSegs = new Map<string, Set<string>>();
  private codebookChanged = false;
  private pendingAdded = new Map<string, Flag>();
  private pendingRemoved = new Set<string>();
  private readonly cleanups: Array<() => void> = [];
  /** Segments re-evaluated by the last refresh (for tests and benchmarks). */
  lastRecomputed = 0;

  constructor(o: FlagEngineOptions) {
    this.textDoc = o.textDoc;
    this.codebook = o.codebook;
    this.opts = { independentCoding: o.independentCoding ?? false };
    this.facts = readCodebookFacts(o.codebook);
    const text = getText(o.textDoc);
    // The delta must be read inside the handler: Yjs computes it from the transaction.
    const onText = (e: Y.YTextEvent) => void this.textDeltas.push(e.delta as TextDelta);
    text.observe(onText);
    this.cleanups.push(() => text.unobserve(onText));
    const onCodebook = () => void (this.codebookChanged = true);
    for (const root of [CODES_ROOT, EXCLUSIVE_ROOT, CHANGES_ROOT, FIELD_EDITS_ROOT, META_ROOT]) {
      const t = root === CHANGES_ROOT ? o.codebook.getArray(root) : o.codebook.getMap(root);
      t.observeDeep(onCodebook);
      this.cleanups.push(() => t.unobserveDeep(onCodebook));
    }
    for (const l of o.layers ?? []) this.addLayer(l);
  }

  addLayer(src: LayerSource): void {
    if (this.layers.has(src.layerId)) throw new ConflictError(`layer already added: ${src.layerId}`);
    const map = getSegmentsMap(src.doc);
    const set = this.changed(src.layerId);
    const handler = (events: Array<Y.YEvent<Y.AbstractType<unknown>>>) => {
      const s = this.changed(src.layerId);
      for (const ev of events) {
        if (ev.target === map) for (const k of (ev as Y.YMapEvent<unknown>).keysChanged) s.add(k);
        else if (typeof ev.path[0] === 'string') s.add(ev.path[0]);
      }
    };
    map.observeDeep(handler);
    this.layers.set(src.layerId, { src, unobserve: () => map.unobserveDeep(handler) });
    for (const id of map.keys()) set.add(id);
  }

  removeLayer(layerId: string): void {
    const l = this.layers.get(layerId);
    if (l === undefined) throw new NotFoundError('layer', layerId);
    l.unobserve();
    this.layers.delete(layerId);
    const set = this.changed(layerId);
    for (const e of this.entries.values()) if (e.src.layerId === layerId) set.add(e.rec.id);
  }

  setIndependentCoding(on: boolean): void {
    if (this.opts.independentCoding !== on) this.full = true;
    this.opts = { independentCoding: on };
  }

  /** Current flags, in no particular order (see `sortFlags`). */
  flags(): Flag[] {
    this.refresh();
    return [...this.flagMap.values(), ...this.raceFlags.values()];
  }

  /** The segments with their current offsets, as the engine sees them (copies). */
  segments(): FlagSegment[] {
    this.refresh();
    return [...this.entries.values()].map((e) => ({ ...e.seg }));
  }

  destroy(): void {
    for (const c of this.cleanups) c();
    for (const l of this.layers.values()) l.unobserve();
    this.layers.clear();
  }

  /** Bring flags up to date; returns the flags added (or replaced) and the keys removed since last time. */
  refresh(): FlagChanges {
    if (this.full) this.recomputeAll();
    else if (this.textDeltas.length > 0 || this.changedSegs.size > 0 || this.codebookChanged) this.recomputeDirty();
    const out: FlagChanges = { added: [...this.pendingAdded.values()], removed: [...this.pendingRemoved] };
    this.pendingAdded.clear();
    this.pendingRemoved.clear();
    return out;
  }

  private changed(layerId: string): Set<string> {
    let s = this.changedSegs.get(layerId);
    if (s === undefined) this.changedSegs.set(layerId, (s = new Set()));
    return s;
  }

  private recomputeDirty(): void {
    const dirty = new Set<string>();
    const closure = new Set<string>();
    const neighbours = (r: { start: number; end: number }) => this.index.overlapping(r.start, r.end, (o) => closure.add(segKey(o.layerId, o.id)));

    // 1. Before anything moves: neighbours of segments about to change, at their old offsets.
    for (const [layerId, ids] of this.changedSegs) {
      for (const id of ids) {
        const k = segKey(layerId, id);
        const e = this.entries.get(k);
        if (e !== undefined) neighbours(e.seg);
        dirty.add(k);
      }
    }
    if (this.textDeltas.length > 0) {
      const exact: Entry[] = [];
      const moved: Array<[FlagSegment, number, number]> = [];
      const m = { start: 0, end: 0, touched: false };
      for (const [k, e] of this.entries) {
        const s = e.seg;
        if (s.unresolved) {
          exact.push(e);
          dirty.add(k);
          continue;
        }
        mapRange(s.start, s.end, this.textDeltas, m);
        if (m.touched) {
          neighbours(s); // the index still holds old offsets: nothing has moved yet
          exact.push(e);
          dirty.add(k);
        } else if (m.start !== s.start || m.end !== s.end) moved.push([s, m.start, m.end]);
      }
      this.textDeltas = [];
      // Untouched segments all move by one monotone map: their order in the index stays right.
      for (const [s, a, b] of moved) {
        s.start = a;
        s.end = b;
        this.index.noteWidth(b - a);
      }
      // 2. Touched endpoints are resolved against the Yjs items (one pass for all of them).
      if (exact.length > 0) {
        this.resolveInto(exact);
        this.index.reorder(exact.map((e) => e.seg));
      }
    }

    // 3. Layer changes: drop the old entry, read and resolve the new one.
    if (this.changedSegs.size > 0) {
      const fresh: Entry[] = [];
      for (const [layerId, ids] of this.changedSegs) {
        const layer = this.layers.get(layerId);
        const map = layer === undefined ? undefined : getSegmentsMap(layer.src.doc);
        for (const id of ids) {
          const k = segKey(layerId, id);
          const old = this.entries.get(k);
          if (old !== undefined) {
            this.index.remove(old.seg);
            this.entries.delete(k);
          }
          const m = map?.get(id);
          const rec = m instanceof Y.Map ? readSegment(id, m) : null;
          if (layer !== undefined && rec !== null) fresh.push(this.newEntry(layer.src, rec));
        }
      }
      this.changedSegs.clear();
      this.resolveInto(fresh);
      for (const e of fresh) {
        this.entries.set(segKey(e.src.layerId, e.rec.id), e);
        this.index.add(e.seg);
      }
    }

    // 4. Codebook: segments whose code's status, successor, exclusive sets or definition changed.
    if (this.codebookChanged) {
      this.codebookChanged = false;
      const old = this.facts;
      this.facts = readCodebookFacts(this.codebook);
      this.updateRaceFlags();
      if (old.roundStarts.join() !== this.facts.roundStarts.join()) return this.recomputeAll();
      const changedCodes = new Set<string>();
      for (const id of new Set([...old.signature.keys(), ...this.facts.signature.keys()])) {
        if (old.signature.get(id) !== this.facts.signature.get(id)) changedCodes.add(id);
      }
      if (changedCodes.size > 0) {
        for (const [k, e] of this.entries) {
          const s = e.seg;
          if (!changedCodes.has(s.codeId) && !changedCodes.has(s.effectiveCode)) continue;
          s.effectiveCode = this.facts.effective.get(s.codeId) ?? s.codeId;
          dirty.add(k);
        }
      }
    }

    // 5. After: neighbours at the new offsets; then re-evaluate the closure.
    for (const k of dirty) {
      closure.add(k);
      const e = this.entries.get(k);
      if (e !== undefined) neighbours(e.seg);
    }
    for (const k of closure) this.dropOwned(k);
    for (const k of closure) {
      const e = this.entries.get(k);
      if (e !== undefined) this.evaluate(e.seg);
    }
    this.lastRecomputed = closure.size;
  }

  private recomputeAll(): void {
    this.full = false;
    this.textDeltas = [];
    this.changedSegs.clear();
    this.codebookChanged = false;
    this.facts = readCodebookFacts(this.codebook);
    for (const k of this.flagMap.keys()) this.pendingRemoved.add(k);
    this.pendingAdded.clear();
    this.updateRaceFlags();
    this.entries.clear();
    const all: Entry[] = [];
    for (const l of this.layers.values()) {
      getSegmentsMap(l.src.doc).forEach((m, id) => {
        const rec = m instanceof Y.Map ? readSegment(id, m) : null;
        if (rec !== null) all.push(this.newEntry(l.src, rec));
      });
    }
    this.resolveInto(all);
    for (const e of all) this.entries.set(segKey(e.src.layerId, e.rec.id), e);
    this.index = IntervalIndex.build(all.map((e) => e.seg));
    this.flagMap.clear();
    this.owned.clear();
    for (const e of all) this.evaluate(e.seg);
    this.lastRecomputed = all.length;
  }

  private newEntry(src: LayerSource, rec: SegmentRecord): Entry {
    const seg: FlagSegment = {
      id: rec.id, codeId: rec.codeId, start: 0, end: 0, quote: '', orphaned: false, unresolved: true, turn: null,
      createdAt: rec.createdAt, layerId: src.layerId, coder: src.coder, effectiveCode: this.facts.effective.get(rec.codeId) ?? rec.codeId,
    };
    if (rec.round !== undefined) seg.round = rec.round;
    if (rec.checkedAt !== undefined) seg.checkedAt = rec.checkedAt;
    return { src, rec, seg };
  }

  /** Resolve entries' anchors exactly, in one pass. Flags need offsets only: quote and turn stay empty. */
  private resolveInto(list: Entry[]): void {
    if (list.length === 0) return;
    const anchors: Uint8Array[] = new Array(list.length * 2);
    list.forEach((e, i) => {
      anchors[2 * i] = e.rec.start;
      anchors[2 * i + 1] = e.rec.end;
    });
    const idx = resolveAnchors(this.textDoc, anchors);
    list.forEach((e, i) => {
      const a = idx[2 * i];
      const b = idx[2 * i + 1];
      const s = e.seg;
      if (a == null || b == null) {
        s.start = s.end = 0;
        s.unresolved = true;
        s.orphaned = false;
      } else {
        s.start = Math.min(a, b);
        s.end = b;
        s.unresolved = false;
        s.orphaned = s.start === s.end;
      }
    });
  }

  private updateRaceFlags(): void {
    const next = new Map(definitionRaceFlags(this.codebook).map((f) => [f.key, f]));
    for (const k of this.raceFlags.keys()) if (!next.has(k)) this.noteRemoved(k);
    for (const f of next.values()) if (JSON.stringify(this.raceFlags.get(f.key)) !== JSON.stringify(f)) this.noteAdded(f);
    this.raceFlags = next;
  }

  private noteAdded(f: Flag): void {
    this.pendingRemoved.delete(f.key);
    this.pendingAdded.set(f.key, f);
  }

  private noteRemoved(key: string): void {
    this.pendingAdded.delete(key);
    this.pendingRemoved.add(key);
  }

  private dropOwned(k: string): void {
    const keys = this.owned.get(k);
    if (keys === undefined) return;
    for (const fk of keys) {
      const f = this.flagMap.get(fk);
      if (f === undefined) continue;
      this.flagMap.delete(fk);
      this.noteRemoved(fk);
      for (const r of f.segments) this.owned.get(segKey(r.layerId, r.segmentId))?.delete(fk);
    }
    this.owned.delete(k);
  }

  private evaluate(s: FlagSegment): void {
    const add = (f: Flag) => {
      this.flagMap.set(f.key, f);
      this.noteAdded(f);
      // single and pair flags are owned by every segment they name; disagreement only by the first
      const owners = f.kind === 'disagreement' ? [f.segments[0]!] : f.segments;
      for (const r of owners) {
        const ok = segKey(r.layerId, r.segmentId);
        let set = this.owned.get(ok);
        if (set === undefined) this.owned.set(ok, (set = new Set()));
        set.add(f.key);
      }
    };
    for (const f of singleSegmentFlags(s, this.facts)) add(f);
    for (const f of overlapFlags(s, this.index, this.facts, this.opts)) add(f);
  }
}

/** Flags in a stable order: by kind, then key. */
export function sortFlags(flags: Flag[]): Flag[] {
  return flags.sort((a, b) => (a.kind < b.kind ? -1 : a.kind > b.kind ? 1 : a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
}

/** All flags at once, without keeping state (same rules as the engine), sorted. */
export function computeFlags(o: FlagEngineOptions): Flag[] {
  const e = new FlagEngine(o);
  try {
    return sortFlags(e.flags());
  } finally {
    e.destroy();
  }
}
