/**
 * Resolution timings shared by `pnpm bench model` and `pnpm bench segments`: the current resolver and
 * the previous one (resolve-by-item.ts) interleaved run by run, so both see the same machine load.
 * Cold runs resolve fresh copies of the anchors (as a first read from the log gives), warm runs the
 * same copies again. Not a bench itself (run.ts loads `*.bench.ts` only).
 */
import type * as Y from 'yjs';
import { resolveSegments, type SegmentRecord } from '@gloss/model';
import { resolveSegmentsByItem } from '../packages/model/src/resolve-by-item.js';

export function timeIt(fn: () => unknown): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}

/** Fresh copies of the first `n` segments' anchors: no decode or item cache carried over. */
export function freshAnchors(all: readonly SegmentRecord[], n = all.length): SegmentRecord[] {
  return all.slice(0, n).map((s) => ({ ...s, start: s.start.slice(), end: s.end.slice() }));
}

export interface ResolveTimes {
  cold: number[];
  warm: number[];
  prevCold: number[];
  prevWarm: number[];
}

export function timeResolvers(textDoc: Y.Doc, all: readonly SegmentRecord[], runs: number): ResolveTimes {
  const out: ResolveTimes = { cold: [], warm: [], prevCold: [], prevWarm: [] };
  for (let r = 0; r < runs; r++) {
    const segs = freshAnchors(all);
    out.cold.push(timeIt(() => resolveSegments(textDoc, segs)));
    out.warm.push(timeIt(() => resolveSegments(textDoc, segs)));
    const prev = freshAnchors(all);
    out.prevCold.push(timeIt(() => resolveSegmentsByItem(textDoc, prev)));
    out.prevWarm.push(timeIt(() => resolveSegmentsByItem(textDoc, prev)));
  }
  return out;
}
