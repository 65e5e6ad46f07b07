/**
 * Margin layout (pure): which segment bars each turn shows, in which lane (one per visible layer)
 * and sub-column (overlapping segments of one layer sit side by side), and how far down the turn
 * each bar starts and ends, as fractions of the turn's characters.
 */
export interface MarginSegment { id: string; layer: string; codeId: string; start: number; end: number; orphaned: boolean }
export interface TurnSpan { start: number; end: number }
export interface Bar {
  id: string;
  layer: string;
  lane: number;
  column: number;
  codeId: string;
  /** 0..1 from the top of the turn (an estimate by characters, until the words are measured) */
  top: number;
  bottom: number;
  /** The part of the segment inside this turn, as offsets into the turn's words. */
  from: number;
  to: number;
  /** The segment begins (ends) in this turn: draw a cap. */
  opens: boolean;
  closes: boolean;
  orphaned: boolean;
}

export const MAX_COLUMNS = 3;

/** Sub-columns per segment: a greedy sweep per layer; more than MAX_COLUMNS deep overlaps share the last. */
export function assignColumns(segments: readonly MarginSegment[]): Map<string, number> {
  const out = new Map<string, number>();
  const byLayer = new Map<string, MarginSegment[]>();
  for (const s of segments) {
    const list = byLayer.get(s.layer);
    if (list) list.push(s);
    else byLayer.set(s.layer, [s]);
  }
  for (const list of byLayer.values()) {
    list.sort((a, b) => a.start - b.start || b.end - a.end);
    const colEnds: number[] = [];
    for (const s of list) {
      let c = colEnds.findIndex((e) => e <= s.start);
      if (c < 0) c = colEnds.length < MAX_COLUMNS ? colEnds.push(0) - 1 : MAX_COLUMNS - 1;
      colEnds[c] = Math.max(colEnds[c] ?? 0, s.end);
      out.set(s.id, c);
    }
  }
  return out;
}

/** First turn whose end is past `offset` (turns sorted by start). */
function firstTurnFrom(turns: readonly TurnSpan[], offset: number): number {
  let lo = 0;
  let hi = turns.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (turns[mid]!.end < offset) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * `firstLane` numbers the lanes from there: a layer laid out alone at the lane it is drawn in keeps its
 * bars (the same objects) through `mergeLanes`, so turns whose bars did not change keep their DOM.
 */
export function layoutBars(turns: readonly TurnSpan[], segments: readonly MarginSegment[], lanes: readonly string[], firstLane = 0): Bar[][] {
  const out: Bar[][] = turns.map(() => []);
  const laneOf = new Map(lanes.map((l, i) => [l, firstLane + i]));
  const cols = assignColumns(segments);
  for (const s of segments) {
    const lane = laneOf.get(s.layer);
    if (lane === undefined) continue;
    for (let t = firstTurnFrom(turns, s.start); t < turns.length; t++) {
      const turn = turns[t]!;
      if (turn.start > s.end || (turn.start === s.end && !s.orphaned)) break;
      if (s.end < turn.start || s.start > turn.end) continue;
      const len = Math.max(1, turn.end - turn.start);
      const a = Math.max(s.start, turn.start) - turn.start;
      const b = Math.min(s.end, turn.end) - turn.start;
      out[t]!.push({
        id: s.id,
        layer: s.layer,
        lane,
        column: cols.get(s.id) ?? 0,
        codeId: s.codeId,
        top: a / len,
        bottom: Math.max(b, a) / len,
        from: a,
        to: Math.max(a, b),
        opens: s.start >= turn.start,
        closes: s.end <= turn.end,
        orphaned: s.orphaned,
      });
      if (s.orphaned) break;
    }
  }
  return out;
}

/** Whether two turns' bars draw the same, so an unchanged turn keeps its DOM. */
export function sameBars(a: readonly Bar[], b: readonly Bar[]): boolean {
  if (a === b) return true;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!;
    const y = b[i]!;
    if (x.id !== y.id || x.codeId !== y.codeId || x.lane !== y.lane || x.column !== y.column || x.top !== y.top || x.bottom !== y.bottom ||
      x.opens !== y.opens || x.closes !== y.closes || x.orphaned !== y.orphaned) return false;
  }
  return true;
}

/**
 * Joins per-layer layouts (each made by `layoutBars` with that layer as its only lane) into one list per
 * turn, lanes numbered in `lanes` order. Columns are per layer already, so a layer that did not change
 * keeps its bars: when one layer lands, only that layer is laid out again. A bar already at its lane is
 * passed on as it is (a copy otherwise): laid out at their lanes, unchanged layers keep their objects.
 */
export function mergeLanes(turnCount: number, lanes: readonly string[], byLayer: ReadonlyMap<string, readonly Bar[][]>): Bar[][] {
  const out: Bar[][] = [];
  for (let t = 0; t < turnCount; t++) {
    const row: Bar[] = [];
    lanes.forEach((layer, lane) => {
      for (const b of byLayer.get(layer)?.[t] ?? []) row.push(b.lane === lane ? b : { ...b, lane });
    });
    out.push(row);
  }
  return out;
}
