import * as Y from 'yjs';
import {
  addCode, checkParentFor, codesMap, logChange, requireCodeMap,
  type Actor, type NewCode,
} from './codebook-doc.js';
import { ConflictError, InvalidArgumentError, NotFoundError } from './errors.js';
import { getSegmentsMap, type SegmentRecord } from './layer-doc.js';

/**
 * Second-cycle operations on the codebook. Segments live in layer documents, which the codebook does
 * not hold, so each operation is recorded in the codebook (status, mergedInto, split assignment) and
 * then applied to each layer by `reconcileLayer`. A client that was offline during a merge and later
 * applies the old code keeps its segment on the merged code: the `retired-code` flag shows it until the
 * layer's owner reconciles (the web app reconciles when it opens a layer), which moves it on.
 */

export function renameCode(cb: Y.Doc, codeId: string, label: string, actor: Actor): void {
  const m = requireCodeMap(cb, codeId);
  if (typeof label !== 'string' || label.trim() === '') throw new InvalidArgumentError('a code needs a non-empty label');
  const old = String(m.get('label'));
  cb.transact(() => {
    m.set('label', label.trim());
    logChange(cb, actor, 'rename', [codeId], { field: 'label', detail: `${old} -> ${label.trim()}` });
  });
}

/** Re-parent a code (null = top level). Refuses to place a code under its own descendant. */
export function moveCode(cb: Y.Doc, codeId: string, parentId: string | null, actor: Actor): void {
  const m = requireCodeMap(cb, codeId);
  cb.transact(() => {
    m.set('parentId', checkParentFor(cb, parentId, codeId));
    logChange(cb, actor, 'move', [codeId], { field: 'parentId', detail: parentId ?? '(top)' });
  });
}

/** Merge `fromIds` into `intoId`: each from-code becomes status `merged` with `mergedInto`. */
export function mergeCodes(cb: Y.Doc, fromIds: readonly string[], intoId: string, actor: Actor): void {
  requireCodeMap(cb, intoId);
  if (fromIds.length === 0) throw new InvalidArgumentError('nothing to merge');
  if (fromIds.includes(intoId)) throw new ConflictError('a code cannot be merged into itself');
  if (effectiveCodeId(cb, intoId) !== intoId) throw new ConflictError(`code ${intoId} is itself merged or split`);
  const maps = fromIds.map((id) => requireCodeMap(cb, id));
  cb.transact(() => {
    for (const m of maps) {
      m.set('status', 'merged');
      m.set('mergedInto', intoId);
    }
    // Children of a merged code move under the code it merged into.
    codesMap(cb).forEach((m) => {
      if (m instanceof Y.Map && fromIds.includes(m.get('parentId') as string)) m.set('parentId', intoId);
    });
    logChange(cb, actor, 'merge', [...fromIds, intoId], { detail: `${fromIds.join(', ')} -> ${intoId}` });
  });
}

/** Retire a code without a successor: its segments stay and are flagged `retired-code`. */
export function retireCode(cb: Y.Doc, codeId: string, actor: Actor): void {
  const m = requireCodeMap(cb, codeId);
  cb.transact(() => {
    m.set('status', 'retired');
    logChange(cb, actor, 'retire', [codeId]);
  });
}

/**
 * Split a code into new codes. `assignment` says, for each segment id, which new code it goes to;
 * it is stored in the codebook (`splitAssignment`) so every layer, including ones offline now, can apply
 * it. The old code is retired with `splitInto`. Returns the new codes' ids (in `newCodes` order).
 */
export function splitCode(cb: Y.Doc, codeId: string, newCodes: readonly NewCode[], assignment: ReadonlyMap<string, string>, actor: Actor): string[] {
  const m = requireCodeMap(cb, codeId);
  if (newCodes.length < 2) throw new InvalidArgumentError('a split needs at least two new codes');
  const parentId = (m.get('parentId') as string | null) ?? null;
  let ids: string[] = [];
  cb.transact(() => {
    ids = newCodes.map((c) => addCode(cb, { parentId, ...c }, actor));
    for (const [seg, target] of assignment) {
      if (!ids.includes(target)) throw new InvalidArgumentError(`segment ${seg} is assigned to ${target}, which is not one of the new codes`);
    }
    const stored = new Y.Map<string>();
    m.set('status', 'retired');
    m.set('splitInto', ids);
    m.set('splitAssignment', stored);
    for (const [seg, target] of assignment) stored.set(seg, target);
    logChange(cb, actor, 'split', [codeId, ...ids], { detail: `${assignment.size} segments assigned` });
  });
  return ids;
}

/** The code a segment coded `codeId` now belongs to: follows merges (not splits, which depend on the segment). */
export function effectiveCodeId(cb: Y.Doc, codeId: string): string {
  let id = codeId;
  const seen = new Set<string>();
  for (;;) {
    const m = codesMap(cb).get(id);
    if (!(m instanceof Y.Map) || seen.has(id)) return id;
    seen.add(id);
    const into = m.get('mergedInto');
    if (m.get('status') !== 'merged' || typeof into !== 'string') return id;
    id = into;
  }
}

/** Where one segment should go now: through merges, and through a split when the split assigned it. */
export function targetCodeFor(cb: Y.Doc, segmentId: string, codeId: string): string {
  let id = codeId;
  for (let guard = 0; guard < 1000; guard++) {
    const next = effectiveCodeId(cb, id);
    const m = codesMap(cb).get(next);
    const assign = m instanceof Y.Map ? m.get('splitAssignment') : undefined;
    const to = assign instanceof Y.Map ? (assign.get(segmentId) as string | undefined) : undefined;
    if (to === undefined || to === next) return next;
    id = to;
  }
  return id;
}

/** Recode a layer's segments by an explicit mapping (old code id -> new code id). Returns the number recoded. */
export function applyMergeToLayer(layer: Y.Doc, mapping: ReadonlyMap<string, string>): number {
  let n = 0;
  layer.transact(() => {
    getSegmentsMap(layer).forEach((m) => {
      if (!(m instanceof Y.Map)) return;
      const to = mapping.get(m.get('codeId') as string);
      if (to !== undefined && to !== m.get('codeId')) {
        m.set('codeId', to);
        n++;
      }
    });
  });
  return n;
}

/** Apply the split of `codeId` stored in the codebook to one layer. Returns recoded and unassigned segment ids. */
export function applySplitToLayer(cb: Y.Doc, codeId: string, layer: Y.Doc): { recoded: string[]; unassigned: string[] } {
  const assign = requireCodeMap(cb, codeId).get('splitAssignment');
  if (!(assign instanceof Y.Map)) throw new NotFoundError('split of code', codeId);
  const recoded: string[] = [];
  const unassigned: string[] = [];
  layer.transact(() => {
    getSegmentsMap(layer).forEach((m, id) => {
      if (!(m instanceof Y.Map) || m.get('codeId') !== codeId) return;
      const to = assign.get(id) as string | undefined;
      if (to === undefined) unassigned.push(id);
      else {
        m.set('codeId', to);
        recoded.push(id);
      }
    });
  });
  return { recoded, unassigned };
}

/** Bring a layer up to date with every merge and split in the codebook. Returns the number of segments recoded. */
export function reconcileLayer(cb: Y.Doc, layer: Y.Doc): number {
  let n = 0;
  layer.transact(() => {
    getSegmentsMap(layer).forEach((m, id) => {
      if (!(m instanceof Y.Map)) return;
      const code = m.get('codeId');
      if (typeof code !== 'string') return;
      const to = targetCodeFor(cb, id, code);
      if (to !== code) {
        m.set('codeId', to);
        n++;
      }
    });
  });
  return n;
}

// ---- previews: pure, over segments the caller has loaded (layer id -> segments) ----

export interface AffectedSegment {
  layerId: string;
  segmentId: string;
  fromCode: string;
  toCode: string | null;
}

export interface OperationPreview {
  affected: AffectedSegment[];
  count: number;
  perLayer: Record<string, number>;
  /** Segments that the operation would leave without a live code (split without assignment, retire). */
  unassigned: AffectedSegment[];
}

function preview(layers: ReadonlyMap<string, readonly SegmentRecord[]>, pick: (s: SegmentRecord) => string | null | undefined): OperationPreview {
  const affected: AffectedSegment[] = [];
  const unassigned: AffectedSegment[] = [];
  const perLayer: Record<string, number> = {};
  for (const [layerId, segs] of layers) {
    for (const s of segs) {
      const to = pick(s);
      if (to === undefined) continue;
      const a = { layerId, segmentId: s.id, fromCode: s.codeId, toCode: to };
      affected.push(a);
      if (to === null) unassigned.push(a);
      perLayer[layerId] = (perLayer[layerId] ?? 0) + 1;
    }
  }
  return { affected, count: affected.length, perLayer, unassigned };
}

export function previewMerge(layers: ReadonlyMap<string, readonly SegmentRecord[]>, fromIds: readonly string[], intoId: string): OperationPreview {
  return preview(layers, (s) => (fromIds.includes(s.codeId) ? intoId : undefined));
}

export function previewSplit(layers: ReadonlyMap<string, readonly SegmentRecord[]>, codeId: string, assignment: ReadonlyMap<string, string>): OperationPreview {
  return preview(layers, (s) => (s.codeId === codeId ? (assignment.get(s.id) ?? null) : undefined));
}

export function previewRetire(layers: ReadonlyMap<string, readonly SegmentRecord[]>, codeId: string): OperationPreview {
  return preview(layers, (s) => (s.codeId === codeId ? null : undefined));
}

export function previewRename(layers: ReadonlyMap<string, readonly SegmentRecord[]>, codeId: string): OperationPreview {
  return preview(layers, (s) => (s.codeId === codeId ? codeId : undefined));
}


