/**
 * Each segment's flag kinds, kept current from one live FlagEngine's changes (what `refresh()` reports
 * added, replaced and removed), as the JSON the segments route writes after `"flags":` — sorted,
 * distinct kinds. The route's answer then rebuilds no kinds map from the ~14,000 flags of a long text
 * on every change (issue 11 item 4): only the segments a changed flag names are looked at again.
 */
import type { Flag, FlagEngine } from '@gloss/model';

export class FlagKinds {
  /** The flags as last reported, by key: a replaced or removed flag is uncounted as it was counted. */
  private readonly flags = new Map<string, Flag>();
  /** layer -> segment -> kind -> how many current flags of that kind name the segment */
  private readonly counts = new Map<string, Map<string, Map<string, number>>>();
  /** layer -> segment -> its kinds as JSON in UTF-8 (one Buffer per distinct list); a segment without flags is absent ('[]'). */
  private readonly json = new Map<string, Map<string, Buffer>>();
  /** The distinct lists' bytes: a handful of kinds make a handful of lists. */
  private readonly bytes = new Map<string, Buffer>();

  constructor(readonly engine: FlagEngine) {}

  /** Brings the kinds up to date with the documents the engine observes. */
  update(): void {
    const { added, removed } = this.engine.refresh();
    if (added.length === 0 && removed.length === 0) return;
    const touched = new Map<string, Set<string>>();
    for (const key of removed) {
      const f = this.flags.get(key);
      if (f === undefined) continue;
      this.flags.delete(key);
      this.count(f, -1, touched);
    }
    for (const f of added) {
      const old = this.flags.get(f.key);
      if (old !== undefined) this.count(old, -1, touched);
      this.flags.set(f.key, f);
      this.count(f, 1, touched);
    }
    for (const [layerId, ids] of touched) {
      const byId = this.counts.get(layerId);
      let out = this.json.get(layerId);
      for (const id of ids) {
        const kinds = byId?.get(id);
        if (kinds === undefined || kinds.size === 0) {
          byId?.delete(id);
          out?.delete(id);
          continue;
        }
        if (out === undefined) this.json.set(layerId, (out = new Map()));
        const json = JSON.stringify([...kinds.keys()].sort());
        let b = this.bytes.get(json);
        if (b === undefined) this.bytes.set(json, (b = Buffer.from(json, 'utf8')));
        out.set(id, b);
      }
    }
  }

  /** A layer's flagged segments, each with its flags as JSON in UTF-8 (a segment absent has none: `[]`). */
  layer(layerId: string): ReadonlyMap<string, Buffer> | undefined {
    return this.json.get(layerId);
  }

  private count(f: Flag, by: 1 | -1, touched: Map<string, Set<string>>): void {
    for (const ref of f.segments) {
      let byId = this.counts.get(ref.layerId);
      if (byId === undefined) this.counts.set(ref.layerId, (byId = new Map()));
      let kinds = byId.get(ref.segmentId);
      if (kinds === undefined) byId.set(ref.segmentId, (kinds = new Map()));
      const n = (kinds.get(f.kind) ?? 0) + by;
      if (n > 0) kinds.set(f.kind, n);
      else kinds.delete(f.kind);
      let t = touched.get(ref.layerId);
      if (t === undefined) touched.set(ref.layerId, (t = new Set()));
      t.add(ref.segmentId);
    }
  }
}
