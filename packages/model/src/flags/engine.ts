import * as Y from 'yjs';
import { getText } from '../text-doc.js';
import { readTurns } from '../turns.js';
import { resolveSegments } from '../resolve.js';
import { getSegmentsMap, listSegments, readSegment, type SegmentRecord } from '../layer-doc.js';
import { CODES_ROOT, CHANGES_ROOT, EXCLUSIVE_ROOT } from '../codebook-doc.js';
import { FIELD_EDITS_ROOT } from '../field-edits.js';
import { ConflictError, NotFoundError } from '../errors.js';
import { readCodebookFacts, type CodebookFacts } from './codebook-facts.js';
import { definitionRaceFlags } from './definition-race.js';
import { IntervalIndex } from './interval-index.js';
import { overlapFlags, singleSegmentFlags, type RuleOptions } from './rules.js';
import { segKey, type Flag, type FlagSegment } from './types.js';
import { dirtyFromTextDeltas, type TextDelta } from './text-delta.js';

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

interface LayerState {
  src: LayerSource;
  unobserve: () => void;
}

/**
 * Live flags for one text: the visible layers and the study's codebook. It observes the documents and
 * marks what each change touched; `flags()` then recomputes only the flags owned by the touched segments
 * and their overlap neighbours (old and new positions). A text edit re-resolves every segment in one
 * pass (a few ms) but re-evaluates only segments whose endpoints fell in a deleted range or did not move
 * with the edit; insertions alone cannot change any overlap (DESIGN §2 anchoring).
 */
export class FlagEngine {
  private readonly textDoc: Y.Doc;
  private readonly codebook: Y.Doc;
  private readonly layers = new Map<string, LayerState>();
  private opts: RuleOptions;
  private segs = new Map<string, FlagSegment>();
  private index = IntervalIndex.build([]);
  private facts: CodebookFacts;
  private flagMap = new Map<string, Flag>();
  private owned = new Map<string, Set<string>>();
  private raceFlags: Flag[] = [];
  // pending changes since the last refresh
  private full = true;
  private textDeltas: TextDelta[] = [];
  private changedSegs = new Map<string, Set<string>>();
  private codebookChanged = false;
  private readonly cleanups: Array<() => void> = [];
  /** Segments re-evaluated by the last refresh (for tests and benchmarks). */
  lastRecomputed = 0;

  constructor(o: FlagEngineOptions) {
    this.textDoc = o.textDoc;
    this.codebook = o.codebook;
    this.opts = { independentCoding: o.independentCoding ?? false };
    this.facts = readCodebookFacts(o.codebook);
    const text = getText(o.textDoc);
    const onText = (e: Y.YTextEvent) => {
      this.textDeltas.push(e.delta as TextDelta);
    };
    text.observe(onText);
    this.cleanups.push(() => text.unobserve(onText));
    const onCodebook = () => {
      this.codebookChanged = true;
    };
    for (const root of [CODES_ROOT, EXCLUSIVE_ROOT, CHANGES_ROOT, FIELD_EDITS_ROOT, 'meta']) {
      const t = o.codebook.get(root, root === CHANGES_ROOT ? Y.Array : Y.Map);
      t.observeDeep(onCodebook);
      this.cleanups.push(() => t.unobserveDeep(onCodebook));
    }
    for (const l of o.layers ?? []) this.addLayer(l);
  }

  addLayer(src: LayerSource): void {
    if (this.layers.has(src.layerId)) throw new ConflictError(`layer already added: ${src.layerId}`);
    const map = getSegmentsMap(src.doc);
    const handler = (events: Array<Y.YEvent<Y.AbstractType<unknown>>>) => {
      let set = this.changedSegs.get(src.layerId);
      if (set === undefined) this.changedSegs.set(src.layerId, (set = new Set()));
      for (const ev of events) {
        if (ev.target === map) for (const k of (ev as Y.YMapEvent<unknown>).keysChanged) set.add(k);
        else if (typeof ev.path[0] === 'string') set.add(ev.path[0]);
      }
    };
    map.observeDeep(handler);
    this.layers.set(src.layerId, { src, unobserve: () => map.unobserveDeep(handler) });
    this.changedSegs.set(src.layerId, new Set(listSegments(src.doc).map((s) => s.id)));
  }

  removeLayer(layerId: string): void {
    const l = this.layers.get(layerId);
    if (l === undefined) throw new NotFoundError('layer', layerId);
    l.unobserve();
    this.layers.delete(layerId);
    const set = new Set<string>();
    for (const s of this.segs.values()) if (s.layerId === layerId) set.add(s.id);
    this.changedSegs.set(layerId, set);
  }

  setIndependentCoding(on: boolean): void {
    if (this.opts.independentCoding !== on) this.full = true;
    this.opts = { independentCoding: on };
  }

  /** Current flags, sorted by kind then key. */
  flags(): Flag[] {
    this.refresh();
    return [...this.flagMap.values(), ...this.raceFlags].sort((a, b) => (a.kind < b.kind ? -1 : a.kind > b.kind ? 1 : a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  }

  /** The resolved segments as the engine last saw them. */
  segments(): FlagSegment[] {
    this.refresh();
    return [...this.segs.values()];
  }

  destroy(): void {
    for (const c of this.cleanups) c();
    for (const l of this.layers.values()) l.unobserve();
    this.layers.clear();
  }

  refresh(): void {
    if (this.full) return this.recomputeAll();
    if (this.textDeltas.length === 0 && this.changedSegs.size === 0 && !this.codebookChanged) return;
    const dirty = new Set<string>();
    const oldIndex = this.index;
    const oldRanges: Array<{ start: number; end: number }> = [];
    let positionsChanged = false;
    const turns = readTurns(this.textDoc);

    if (this.textDeltas.length > 0) {
      const before = this.segs;
      const fresh = this.resolveAll(turns);
      for (const k of dirtyFromTextDeltas(before, fresh, this.textDeltas)) dirty.add(k);
      this.segs = fresh;
      this.textDeltas = [];
      positionsChanged = true;
      for (const k of dirty) {
        const o = before.get(k);
        if (o !== undefined) oldRanges.push(o);
      }
    }

    if (this.changedSegs.size > 0) {
      const reread: Array<{ layer: LayerState; rec: SegmentRecord }> = [];
      for (const [layerId, ids] of this.changedSegs) {
        const layer = this.layers.get(layerId);
        for (const id of ids) {
          const k = segKey(layerId, id);
          const old = this.segs.get(k);
          if (old !== undefined) {
            oldRanges.push(old);
            this.segs.delete(k);
          }
          dirty.add(k);
          const m = layer === undefined ? undefined : getSegmentsMap(layer.src.doc).get(id);
          const rec = m instanceof Y.Map ? readSegment(id, m) : null;
          if (layer !== undefined && rec !== null) reread.push({ layer, rec });
        }
      }
      this.changedSegs.clear();
      const resolved = resolveSegments(this.textDoc, reread.map((r) => r.rec), turns);
      resolved.forEach((r, i) => {
        const { layer, rec } = reread[i]!;
        this.segs.set(segKey(layer.src.layerId, rec.id), this.toFlagSegment(layer.src, rec, r));
      });
      positionsChanged = true;
    }

    if (this.codebookChanged) {
      this.codebookChanged = false;
      const old = this.facts;
      this.facts = readCodebookFacts(this.codebook);
      this.raceFlags = definitionRaceFlags(this.codebook);
      if (old.roundStarts.length !== this.facts.roundStarts.length) return this.recomputeAll();
      const changedCodes = new Set<string>();
      for (const id of new Set([...old.signature.keys(), ...this.facts.signature.keys()])) {
        if (old.signature.get(id) !== this.facts.signature.get(id)) changedCodes.add(id);
      }
      if (changedCodes.size > 0) {
        for (const [k, s] of this.segs) {
          const eff = this.facts.effective.get(s.codeId) ?? s.codeId;
          if (changedCodes.has(s.codeId) || changedCodes.has(eff) || changedCodes.has(s.effectiveCode)) {
            if (eff !== s.effectiveCode) {
              this.segs.set(k, { ...s, effectiveCode: eff });
              positionsChanged = true;
            }
            dirty.add(k);
          }
        }
      }
    }

    if (positionsChanged) this.index = IntervalIndex.build(this.segs.values());
    // Closure: the dirty segments plus everything overlapping them before or after the change.
    const closure = new Set(dirty);
    const addNeighbours = (idx: IntervalIndex, r: { start: number; end: number }) =>
      idx.overlapping(r.start, r.end, (o) => closure.add(segKey(o.layerId, o.id)));
    for (const r of oldRanges) addNeighbours(oldIndex, r);
    for (const k of dirty) {
      const s = this.segs.get(k);
      if (s !== undefined) addNeighbours(this.index, s);
    }
    for (const k of closure) this.dropOwned(k);
    for (const k of closure) {
      const s = this.segs.get(k);
      if (s !== undefined) this.evaluate(s);
    }
    this.lastRecomputed = closure.size;
  }

  private recomputeAll(): void {
    this.full = false;
    this.textDeltas = [];
    this.changedSegs.clear();
    this.codebookChanged = false;
    this.facts = readCodebookFacts(this.codebook);
    this.raceFlags = definitionRaceFlags(this.codebook);
    this.segs = this.resolveAll(readTurns(this.textDoc));
    this.index = IntervalIndex.build(this.segs.values());
    this.flagMap.clear();
    this.owned.clear();
    for (const s of this.segs.values()) this.evaluate(s);
    this.lastRecomputed = this.segs.size;
  }

  private resolveAll(turns: ReturnType<typeof readTurns>): Map<string, FlagSegment> {
    const recs: Array<{ src: LayerSource; rec: SegmentRecord }> = [];
    for (const l of this.layers.values()) for (const rec of listSegments(l.src.doc)) recs.push({ src: l.src, rec });
    const resolved = resolveSegments(this.textDoc, recs.map((r) => r.rec), turns);
    const out = new Map<string, FlagSegment>();
    resolved.forEach((r, i) => {
      const { src, rec } = recs[i]!;
      out.set(segKey(src.layerId, rec.id), this.toFlagSegment(src, rec, r));
    });
    return out;
  }

  private toFlagSegment(src: LayerSource, rec: SegmentRecord, r: ReturnType<typeof resolveSegments>[number]): FlagSegment {
    const s: FlagSegment = { ...r, layerId: src.layerId, coder: src.coder, effectiveCode: this.facts.effective.get(rec.codeId) ?? rec.codeId };
    if (rec.round !== undefined) s.round = rec.round;
    if (rec.checkedAt !== undefined) s.checkedAt = rec.checkedAt;
    return s;
  }

  private dropOwned(k: string): void {
    const keys = this.owned.get(k);
    if (keys === undefined) return;
    for (const fk of keys) {
      const f = this.flagMap.get(fk);
      if (f === undefined) continue;
      this.flagMap.delete(fk);
      for (const r of f.segments) this.owned.get(segKey(r.layerId, r.segmentId))?.delete(fk);
    }
    this.owned.delete(k);
  }

  private evaluate(s: FlagSegment): void {
    for (const f of [...singleSegmentFlags(s, this.facts), ...overlapFlags(s, this.index, this.facts, this.opts)]) {
      this.flagMap.set(f.key, f);
      // single and pair flags are owned by every segment they name; disagreement only by the first
      const owners = f.kind === 'disagreement' ? [f.segments[0]!] : f.segments;
      for (const r of owners) {
        const ok = segKey(r.layerId, r.segmentId);
        let set = this.owned.get(ok);
        if (set === undefined) this.owned.set(ok, (set = new Set()));
        set.add(f.key);
      }
    }
  }
}

/** All flags at once, without keeping state (same rules as the engine). */
export function computeFlags(o: FlagEngineOptions): Flag[] {
  const e = new FlagEngine(o);
  try {
    return e.flags();
  } finally {
    e.destroy();
  }
}
