/** A Y.Text event delta: retain / insert / delete ops in the coordinates before the change. */
export type TextDelta = Array<{ retain?: number; insert?: unknown; delete?: number }>;

export interface MappedRange {
  start: number;
  end: number;
  /**
   * An endpoint lay in or on the edge of a deleted range, or exactly at an insertion point. Only then
   * can the endpoint's new offset differ from the map below (an anchor on a deleted character next to
   * an insertion may land on either side), and only then can an overlap relation change.
   */
  touched: boolean;
}

/**
 * Map a segment's offsets through a sequence of text edits. Away from the edit points every anchor
 * moves exactly as the edit moves offsets: an insertion at p shifts an anchor whose character lies at
 * or after p (start at >= p, end at > p), a deletion of [a, b) shifts anchors after it by a - b.
 * This is the same count Yjs makes when it resolves (visible characters left of the anchor's
 * character), so the incremental engine re-resolves only `touched` anchors.
 */
export function mapRange(start: number, end: number, deltas: readonly TextDelta[], out: MappedRange = { start: 0, end: 0, touched: false }): MappedRange {
  let touched = false;
  for (const delta of deltas) {
    let pos = 0; // old coordinates of this delta
    let shift = 0;
    let ns = start;
    let ne = end;
    let sDone = false;
    let eDone = false;
    for (const op of delta) {
      if (op.retain !== undefined) {
        pos += op.retain;
        continue;
      }
      if (op.insert !== undefined) {
        if (start === pos || end === pos) touched = true;
        if (!sDone && start < pos) { ns = start + shift; sDone = true; }
        if (!eDone && end <= pos) { ne = end + shift; eDone = true; }
        shift += typeof op.insert === 'string' ? op.insert.length : 1;
      } else if (op.delete !== undefined) {
        const a = pos;
        const b = pos + op.delete;
        if ((start >= a && start <= b) || (end >= a && end <= b)) touched = true;
        if (!sDone && start < a) { ns = start + shift; sDone = true; }
        if (!eDone && end <= a) { ne = end + shift; eDone = true; }
        shift -= op.delete;
        pos = b;
      }
      if (sDone && eDone) break;
    }
    start = sDone ? ns : start + shift;
    end = eDone ? ne : end + shift;
  }
  out.start = start;
  out.end = end;
  out.touched = touched;
  return out;
}
