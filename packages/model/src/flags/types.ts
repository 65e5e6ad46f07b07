import type { ResolvedSegment } from '../resolve.js';

export const FLAG_KINDS = [
  'disagreement', 'exclusive', 'duplicate', 'retired-code', 'orphaned', 'definition-race', 'stale-definition',
] as const;
export type FlagKind = (typeof FLAG_KINDS)[number];

export interface SegmentRef {
  layerId: string;
  segmentId: string;
}

/**
 * A flag names the segments (and codes, fields) it is about, not offsets: offsets move with every
 * correction, so the client draws a flag from its segments' current resolution.
 */
export interface Flag {
  kind: FlagKind;
  /** Stable identity: same situation, same key, across recomputations. */
  key: string;
  segments: SegmentRef[];
  codeIds: string[];
  /** definition-race: the field; stale-definition: the field changed last. */
  field?: string;
  /** Coders (layer owners) or editors involved. */
  people?: string[];
  detail?: string;
}

/** A resolved segment with what the flag rules need to know about its layer and code. */
export interface FlagSegment extends ResolvedSegment {
  layerId: string;
  coder: string;
  /** The code the segment counts as now (through merges); `codeId` stays as written. */
  effectiveCode: string;
  round?: number;
  checkedAt?: number;
}

export const segKey = (layerId: string, segmentId: string) => `${layerId}\u0000${segmentId}`;
export const refOf = (s: { layerId: string; id: string }): SegmentRef => ({ layerId: s.layerId, segmentId: s.id });

export function overlaps(a: { start: number; end: number }, b: { start: number; end: number }): boolean {
  return a.start < b.end && b.start < a.end;
}
