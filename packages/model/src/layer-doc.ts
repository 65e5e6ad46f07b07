import * as Y from 'yjs';
import { anchorRange } from './anchor.js';
import { InvalidArgumentError, NotFoundError } from './errors.js';
import { newId, systemClock, type Clock } from './ids.js';

/** Root name of a layer document (DESIGN §2). */
export const SEGMENTS_ROOT = 'segments';

/**
 * A segment as stored in a layer: the DESIGN §2 fields plus optional bookkeeping.
 * `round` is the calibration round the segment was coded in; `checkedAt` is when its coder last
 * re-checked it against the code's current definition (clears `stale-definition`).
 */
export interface SegmentRecord {
  id: string;
  codeId: string;
  start: Uint8Array;
  end: Uint8Array;
  createdAt: number;
  note?: string;
  round?: number;
  checkedAt?: number;
}

export interface NewSegment {
  codeId: string;
  start: number;
  end: number;
  note?: string;
  round?: number;
}

/** A layer document: one coder's segments on one text. */
export function newLayerDoc(): Y.Doc {
  return new Y.Doc({ gc: false });
}

export function getSegmentsMap(layer: Y.Doc): Y.Map<Y.Map<unknown>> {
  return layer.getMap<Y.Map<unknown>>(SEGMENTS_ROOT);
}

function requireSegment(layer: Y.Doc, id: string): Y.Map<unknown> {
  const m = getSegmentsMap(layer).get(id);
  if (m === undefined) throw new NotFoundError('segment', id);
  return m;
}

function requireCodeId(codeId: unknown): asserts codeId is string {
  if (typeof codeId !== 'string' || codeId.length === 0) throw new InvalidArgumentError('codeId must be a non-empty string');
}

/** Code [start, end) of the text's current content. Returns the new segment's id. */
export function addSegment(layer: Y.Doc, textDoc: Y.Doc, seg: NewSegment, clock: Clock = systemClock): string {
  requireCodeId(seg.codeId);
  const { start, end } = anchorRange(textDoc, seg.start, seg.end);
  const id = newId('s');
  const m = new Y.Map<unknown>();
  layer.transact(() => {
    m.set('codeId', seg.codeId);
    m.set('start', start);
    m.set('end', end);
    m.set('createdAt', clock());
    if (seg.note !== undefined) m.set('note', seg.note);
    if (seg.round !== undefined) m.set('round', seg.round);
    getSegmentsMap(layer).set(id, m);
  });
  return id;
}

export function removeSegment(layer: Y.Doc, id: string): void {
  requireSegment(layer, id);
  getSegmentsMap(layer).delete(id);
}

/** Move a segment's bounds to [start, end) of the current text (new anchors). */
export function resizeSegment(layer: Y.Doc, textDoc: Y.Doc, id: string, start: number, end: number): void {
  const m = requireSegment(layer, id);
  const a = anchorRange(textDoc, start, end);
  layer.transact(() => {
    m.set('start', a.start);
    m.set('end', a.end);
  });
}

export function recodeSegment(layer: Y.Doc, id: string, codeId: string): void {
  requireCodeId(codeId);
  requireSegment(layer, id).set('codeId', codeId);
}

/** Set or clear (undefined) a segment's note. */
export function setSegmentNote(layer: Y.Doc, id: string, note: string | undefined): void {
  const m = requireSegment(layer, id);
  if (note === undefined) m.delete('note');
  else m.set('note', note);
}

/** Mark a segment as re-checked against its code's current definition (clears `stale-definition`). */
export function recheckSegment(layer: Y.Doc, id: string, clock: Clock = systemClock): void {
  requireSegment(layer, id).set('checkedAt', clock());
}

export function readSegment(id: string, m: Y.Map<unknown>): SegmentRecord | null {
  const codeId = m.get('codeId');
  const start = m.get('start');
  const end = m.get('end');
  // A peer running other code could write a malformed entry; it is skipped rather than crashing readers.
  if (typeof codeId !== 'string' || !(start instanceof Uint8Array) || !(end instanceof Uint8Array)) return null;
  const rec: SegmentRecord = { id, codeId, start, end, createdAt: Number(m.get('createdAt') ?? 0) };
  const note = m.get('note');
  if (typeof note === 'string') rec.note = note;
  const round = m.get('round');
  if (typeof round === 'number') rec.round = round;
  const checkedAt = m.get('checkedAt');
  if (typeof checkedAt === 'number') rec.checkedAt = checkedAt;
  return rec;
}

export function getSegment(layer: Y.Doc, id: string): SegmentRecord {
  const rec = readSegment(id, requireSegment(layer, id));
  if (rec === null) throw new InvalidArgumentError(`segment ${id} is malformed`);
  return rec;
}

/** All well-formed segments of a layer, sorted by id for a stable order. */
export function listSegments(layer: Y.Doc): SegmentRecord[] {
  const out: SegmentRecord[] = [];
  getSegmentsMap(layer).forEach((m, id) => {
    const rec = m instanceof Y.Map ? readSegment(id, m) : null;
    if (rec !== null) out.push(rec);
  });
  return out.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}
