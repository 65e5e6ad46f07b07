import { segKey, type FlagSegment } from './types.js';

/** A Y.Text event delta: retain / insert / delete ops in the coordinates before the change. */
export type TextDelta = Array<{ retain?: number; insert?: unknown; delete?: number }>;

/**
 * Which segments a sequence of text edits may have changed flags for. Overlap between two segments can
 * only change when an endpoint lies in (or on the edge of) a deleted range, or when an endpoint did not
 * move the way the edit moves positions (an insertion landing inside an orphaned segment, say). All
 * other endpoints move by one monotone map, which keeps every overlap relation.
 */
export function dirtyFromTextDeltas(before: ReadonlyMap<string, FlagSegment>, after: ReadonlyMap<string, FlagSegment>, deltas: readonly TextDelta[]): Set<string> {
  const dirty = new Set<string>();
  for (const [k, s] of before) {
    let start = s.start;
    let end = s.end;
    let hit = s.unresolved;
    for (const delta of deltas) {
      const r = mapThrough(delta, start, end);
      if (r.touched) hit = true;
      start = r.start;
      end = r.end;
    }
    const now = after.get(k);
    if (hit || now === undefined || now.start !== start || now.end !== end || now.unresolved !== s.unresolved || now.orphaned !== s.orphaned) dirty.add(k);
  }
  for (const [k, s] of after) if (!before.has(k)) dirty.add(segKey(s.layerId, s.id));
  return dirty;
}

/** Map a segment's endpoints through one delta (start sticks right of an insertion at it, end left). */
function mapThrough(delta: TextDelta, start: number, end: number): { start: number; end: number; touched: boolean } {
  let pos = 0; // position in old coordinates
  let shift = 0; // new - old for positions past `pos`
  let ns = start;
  let ne = end;
  let sDone = false;
  let eDone = false;
  let touched = false;
  for (const op of delta) {
    if (op.retain !== undefined) {
      pos += op.retain;
    } else if (op.insert !== undefined) {
      const n = typeof op.insert === 'string' ? op.insert.length : 1;
      if (!sDone && start < pos) { ns = start + shift; sDone = true; }
      if (!eDone && end <= pos) { ne = end + shift; eDone = true; }
      shift += n;
    } else if (op.delete !== undefined) {
      const a = pos;
      const b = pos + op.delete;
      if ((start >= a && start <= b) || (end >= a && end <= b)) touched = true;
      if (!sDone && start < a) { ns = start + shift; sDone = true; }
      if (!eDone && end < a) { ne = end + shift; eDone = true; }
      shift -= op.delete;
      pos = b;
    }
  }
  if (!sDone) ns = start + shift;
  if (!eDone) ne = end + shift;
  return { start: ns, end: ne, touched };
}
