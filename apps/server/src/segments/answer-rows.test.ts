/**
 * joinRows lending the previous answer's bytes (its leading and trailing rows copied in blocks) writes
 * exactly what a join from nothing writes, after seeded random changes of every kind a view sees: offsets
 * moved after a point (a correction), rows added and removed, codes and quotes changed, flags changed,
 * everything emptied. The join from nothing is itself checked against segmentsWithFlags' JSON by
 * text-cache.test.ts.
 */
import { mulberry32 } from '@gloss/agreement';
import type { ResolvedSegment } from '@gloss/model';
import { describe, expect, it } from 'vitest';
import { joinRows, rowsFor, type Joined, type LayerRows } from './answer-rows.js';

const seg = (id: string, start: number, end: number, codeId: string, quote: string): ResolvedSegment => ({
  id, codeId, start, end, quote, orphaned: start === end, unresolved: false, turn: null, createdAt: 0,
});

describe('joinRows with the previous answer lent', () => {
  it('writes the bytes a join from nothing writes, after random changes', () => {
    const rand = mulberry32(2026_12_02);
    const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)]!;
    const layers = ['a', 'b', 'c'].map((c) => ({ layerDocId: `layer-${c}`, coderId: `coder-${c}`, roundId: null }));
    const segs: ResolvedSegment[][] = layers.map(() => []);
    let next = 0;
    const add = (k: number) => {
      const start = Math.floor(rand() * 500);
      segs[k]!.push(seg(`s${next++}`, start, start + Math.floor(rand() * 40), pick(['c1', 'c2', 'c3']), pick(['tide', 'net "shed"', 'wintér', ''])));
    };
    for (let i = 0; i < 60; i++) add(i % 3);
    const kinds = [Buffer.from('["overlap"]'), Buffer.from('["disagreement","overlap"]'), Buffer.from('["orphaned"]')];
    const flags = layers.map(() => new Map<string, Buffer>());
    let rows: Array<LayerRows | null> = layers.map(() => null);
    let prev: Joined | null = null;
    let lent = 0;
    for (let step = 0; step < 400; step++) {
      const what = rand();
      const k = Math.floor(rand() * 3);
      const list = segs[k]!;
      if (what < 0.3) {
        // a correction at `at`: everything after it moves by `by`
        const at = Math.floor(rand() * 500);
        const by = Math.floor(rand() * 7) - 3;
        for (const l of segs) l.forEach((s, i) => { if (s.start >= at) l[i] = { ...s, start: Math.max(0, s.start + by), end: Math.max(0, s.end + by) }; });
      } else if (what < 0.45) add(k);
      else if (what < 0.55 && list.length > 0) list.splice(Math.floor(rand() * list.length), 1);
      else if (what < 0.65 && list.length > 0) {
        const i = Math.floor(rand() * list.length);
        list[i] = { ...list[i]!, codeId: pick(['c1', 'c2', 'c3']), quote: pick(['tide', 'rowed']) };
      } else if (what < 0.9 && list.length > 0) {
        const id = pick(list).id;
        if (rand() < 0.3) flags[k]!.delete(id);
        else flags[k]!.set(id, pick(kinds));
      } else if (what < 0.92) for (const l of segs) l.length = 0;
      // each layer's resolution is a new array only when it changed, as the text cache keeps them
      rows = rows.map((r, i) => rowsFor(r, layers[i]!, r !== null && sameList(r.from, segs[i]!) ? r.from : [...segs[i]!]));
      const flagsOf = (layerId: string) => flags[layers.findIndex((l) => l.layerDocId === layerId)];
      const fresh = joinRows(rows as LayerRows[], flagsOf);
      const made = joinRows(rows as LayerRows[], flagsOf, prev);
      expect(made.body.toString('utf8')).toBe(fresh.body.toString('utf8'));
      expect(made.count).toBe(fresh.count);
      JSON.parse(made.body.toString('utf8'));
      if (prev !== null && made.count > 0 && prev.count > 0 && made.picked[0] === prev.picked[0]) lent++;
      prev = made;
    }
    // the lending path ran (not only joins from nothing): source, the counter above
    expect(lent).toBeGreaterThan(100);
  });
});

function sameList(a: readonly ResolvedSegment[], b: readonly ResolvedSegment[]): boolean {
  return a.length === b.length && a.every((s, i) => s === b[i]);
}
