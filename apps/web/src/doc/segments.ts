/**
 * A coder's layer: root Y.Map "segments", each value a Y.Map {codeId, start, end, createdAt, note?}
 * with start/end encoded RelativePositions into the text document (DESIGN §2: start assoc 0, end assoc -1).
 */
import * as Y from 'yjs';
import { transcriptOf } from './text.js';

export interface Segment {
  id: string;
  coderId: string;
  codeId: string;
  start: number;
  end: number;
  createdAt: number;
  note?: string;
  orphaned: boolean;
}

export class SegmentError extends Error {
  constructor(readonly code: 'empty_range' | 'no_such_segment' | 'out_of_range', message: string) {
    super(message);
    this.name = 'SegmentError';
  }
}

export const segmentsOf = (layer: Y.Doc): Y.Map<Y.Map<unknown>> => layer.getMap('segments');

export function newId(): string {
  return crypto.randomUUID();
}

function anchors(textDoc: Y.Doc, start: number, end: number): { s: Uint8Array; e: Uint8Array } {
  const t = transcriptOf(textDoc);
  if (!(start >= 0 && end <= t.length && start < end)) throw new SegmentError(start >= end ? 'empty_range' : 'out_of_range', 'Select some words first.');
  return {
    s: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(t, start, 0)),
    e: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(t, end, -1)),
  };
}

export function addSegment(layer: Y.Doc, textDoc: Y.Doc, start: number, end: number, codeId: string, note?: string): string {
  const { s, e } = anchors(textDoc, start, end);
  const id = newId();
  layer.transact(() => {
    const m = new Y.Map<unknown>();
    m.set('codeId', codeId);
    m.set('start', s);
    m.set('end', e);
    m.set('createdAt', Date.now());
    if (note) m.set('note', note);
    segmentsOf(layer).set(id, m);
  });
  return id;
}

function entry(layer: Y.Doc, id: string): Y.Map<unknown> {
  const m = segmentsOf(layer).get(id);
  if (!m) throw new SegmentError('no_such_segment', 'That segment is gone.');
  return m;
}

export function resizeSegment(layer: Y.Doc, textDoc: Y.Doc, id: string, start: number, end: number): void {
  const m = entry(layer, id);
  const { s, e } = anchors(textDoc, start, end);
  layer.transact(() => {
    m.set('start', s);
    m.set('end', e);
  });
}

export function recodeSegment(layer: Y.Doc, id: string, codeId: string): void {
  entry(layer, id).set('codeId', codeId);
}

export function setSegmentNote(layer: Y.Doc, id: string, note: string): void {
  const m = entry(layer, id);
  if (note) m.set('note', note);
  else m.delete('note');
}

export function removeSegment(layer: Y.Doc, id: string): void {
  entry(layer, id);
  segmentsOf(layer).delete(id);
}

/** Resolves every segment of a layer against the text (followUndoneDeletions = false, DESIGN §2). */
export function resolveSegments(layer: Y.Doc, textDoc: Y.Doc, coderId: string): Segment[] {
  const out: Segment[] = [];
  segmentsOf(layer).forEach((m, id) => {
    const sb = m.get('start');
    const eb = m.get('end');
    if (!(sb instanceof Uint8Array) || !(eb instanceof Uint8Array)) return;
    const s = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(sb), textDoc, false);
    const e = Y.createAbsolutePositionFromRelativePosition(Y.decodeRelativePosition(eb), textDoc, false);
    if (!s || !e) return; // the text has not arrived yet
    const note = m.get('note');
    out.push({
      id,
      coderId,
      codeId: String(m.get('codeId') ?? ''),
      start: s.index,
      end: Math.max(s.index, e.index),
      createdAt: Number(m.get('createdAt') ?? 0),
      note: typeof note === 'string' ? note : undefined,
      orphaned: e.index <= s.index,
    });
  });
  out.sort((a, b) => a.start - b.start || a.end - b.end);
  return out;
}
