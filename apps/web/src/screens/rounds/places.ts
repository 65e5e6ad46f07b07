/**
 * The places a walk-through visits: where the round's coders coded differently. With a fixed unit
 * (speaker turn) a place is a turn in which the coders' sets of codes differ, as the round's agreement
 * compares them; otherwise (paragraph, sentence, free spans) a place is a run of overlapping segments
 * in which the sets differ. Pure: resolved segments in, places out.
 */
export interface PlaceSegment { id: string; coderId: string; codeId: string; start: number; end: number }

export interface Place {
  start: number;
  end: number;
  /** Every coder compared, with the codes and segments they have here (maybe none). */
  byCoder: Array<{ coderId: string; codeIds: string[]; segmentIds: string[] }>;
}

function placeOf(start: number, end: number, segs: PlaceSegment[], coders: readonly string[]): Place | null {
  const byCoder = coders.map((coderId) => {
    const own = segs.filter((s) => s.coderId === coderId);
    return { coderId, codeIds: [...new Set(own.map((s) => s.codeId))].sort(), segmentIds: own.map((s) => s.id) };
  });
  const first = byCoder[0]?.codeIds.join('\u0000');
  return byCoder.some((b) => b.codeIds.join('\u0000') !== first) ? { start, end, byCoder } : null;
}

export function disagreementPlaces(
  segments: readonly PlaceSegment[],
  coders: readonly string[],
  turns?: ReadonlyArray<{ start: number; end: number }>,
): Place[] {
  const wanted = new Set(coders);
  const segs = segments.filter((s) => wanted.has(s.coderId) && s.end > s.start).sort((a, b) => a.start - b.start || a.end - b.end);
  const out: Place[] = [];
  if (turns && turns.length > 0) {
    for (const t of turns) {
      const here = segs.filter((s) => s.start < t.end && t.start < s.end);
      if (here.length === 0) continue;
      const p = placeOf(t.start, t.end, here, coders);
      if (p) out.push(p);
    }
    return out;
  }
  let run: PlaceSegment[] = [];
  let runEnd = -1;
  const flush = () => {
    if (run.length === 0) return;
    const p = placeOf(run[0]!.start, runEnd, run, coders);
    if (p) out.push(p);
  };
  for (const s of segs) {
    if (s.start >= runEnd) {
      flush();
      run = [];
    }
    run.push(s);
    runEnd = Math.max(runEnd, s.end);
  }
  flush();
  return out;
}
