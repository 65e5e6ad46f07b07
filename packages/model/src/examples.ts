import type * as Y from 'yjs';
import type { CodeExample } from './codebook-doc.js';
import { getSegment } from './layer-doc.js';
import { resolveAnchors } from './resolve.js';
import { getText } from './text-doc.js';

/**
 * Examples and near-misses point at real text. Built from a segment, an example carries the segment's
 * anchors, so its words are re-read from the text as it is now (a correction or de-identification shows
 * up in the codebook too); `quote` keeps the words as they were when the example was chosen.
 */
export function exampleFromSegment(textDoc: Y.Doc, layer: Y.Doc, textId: string, segmentId: string): Omit<CodeExample, 'id'> {
  const seg = getSegment(layer, segmentId);
  const [a, b] = resolveAnchors(textDoc, [seg.start, seg.end]);
  const quote = a == null || b == null ? '' : getText(textDoc).toString().slice(a, b);
  return { textId, segmentId, start: seg.start, end: seg.end, quote };
}

export interface ResolvedExample {
  /** The words the example covers now; the stored quote when it has no anchors or they cannot be resolved here. */
  current: string;
  start: number | null;
  end: number | null;
  /** The current words differ from those quoted when the example was chosen. */
  changed: boolean;
}

export function resolveExample(textDoc: Y.Doc, example: Pick<CodeExample, 'start' | 'end' | 'quote'>): ResolvedExample {
  if (!(example.start instanceof Uint8Array) || !(example.end instanceof Uint8Array)) {
    return { current: example.quote, start: null, end: null, changed: false };
  }
  const [a, b] = resolveAnchors(textDoc, [example.start, example.end]);
  if (a == null || b == null) return { current: example.quote, start: null, end: null, changed: false };
  const current = getText(textDoc).toString().slice(a, b);
  return { current, start: a, end: b, changed: current !== example.quote };
}
