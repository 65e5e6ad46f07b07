import type * as Y from 'yjs';
import { getTurnsArray } from './text-doc.js';
import { resolveAnchors } from './resolve.js';

/** A speaker turn with its current offsets: [start, end) runs to the next turn's start. */
export interface ResolvedTurn {
  index: number;
  speaker: string | null;
  startMs: number | null;
  endMs: number | null;
  start: number;
  end: number;
}

/** The turns of a text document with their current character offsets (one bulk resolution). */
export function readTurns(textDoc: Y.Doc): ResolvedTurn[] {
  const maps = getTurnsArray(textDoc).toArray();
  const starts = resolveAnchors(textDoc, maps.map((m) => m.get('start') as Uint8Array));
  return turnsAt(maps, starts, textDoc.getText('text').length);
}

/** The turns from their maps and their start anchors already resolved (`resolveSegments` does it in its own walk). */
export function turnsAt(maps: readonly Y.Map<unknown>[], starts: ReadonlyArray<number | null>, length: number): ResolvedTurn[] {
  const out: ResolvedTurn[] = [];
  let prev = 0;
  maps.forEach((m, i) => {
    // A turn whose anchor cannot be resolved yet sits where the previous one ended.
    const start = Math.max(prev, starts[i] ?? prev);
    prev = start;
    out.push({
      index: i,
      speaker: (m.get('speaker') as string | null) ?? null,
      startMs: (m.get('startMs') as number | null) ?? null,
      endMs: (m.get('endMs') as number | null) ?? null,
      start,
      end: length,
    });
  });
  for (let i = 0; i + 1 < out.length; i++) out[i]!.end = out[i + 1]!.start;
  return out;
}

/** Index of the turn holding `offset` (last turn starting at or before it), or -1 when there is none. */
export function turnIndexAt(turns: readonly { start: number }[], offset: number): number {
  let lo = 0;
  let hi = turns.length - 1;
  let found = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (turns[mid]!.start <= offset) {
      found = mid;
      lo = mid + 1;
    } else hi = mid - 1;
  }
  return found;
}
