import * as Y from 'yjs';
import { codesMap, DEFINITION_FIELDS, type DefinitionField } from '../codebook-doc.js';
import { listFieldEdits, type FieldEditRecord } from '../field-edits.js';
import type { Flag } from './types.js';

/**
 * `definition-race`: two people changed the same codebook field concurrently — neither had seen the
 * other's change. Two sources, both causal (clocks and state vectors, never wall-clock time):
 *
 * 1. Run records (field-edits.ts): runs a and b hold a concurrent pair when b.seen[A] < a.to and
 *    a.seen[B] < b.to (neither had seen all of the other's run).
 * 2. The field's own Yjs items: two items of different clients with the same left and right origin were
 *    inserted into the same gap without either seeing the other (had B seen A's item it would have
 *    taken it as an origin). This catches replicas that edited without recording runs.
 *
 * A race is settled once someone edits the field having seen both sides (a later run whose state vector
 * covers both), so the flag goes away when the lead reconciles the wording.
 */

interface EditMark {
  client: number;
  clock: number;
  by: string;
}

function decodeSeen(r: FieldEditRecord, cache: Map<FieldEditRecord, Map<number, number>>): Map<number, number> {
  let sv = cache.get(r);
  if (sv === undefined) {
    sv = Y.decodeStateVector(r.seen);
    cache.set(r, sv);
  }
  return sv;
}

const saw = (sv: Map<number, number>, m: EditMark) => (sv.get(m.client) ?? 0) > m.clock;

/** Pairs of same-gap insertions by different clients in one Y.Text. */
function sameGapPairs(t: Y.Text): Array<[EditMark, EditMark]> {
  const groups = new Map<string, EditMark[]>();
  for (let n = t._start; n !== null; n = n.right) {
    const o = n.origin;
    const ro = n.rightOrigin;
    const key = `${o ? `${o.client}:${o.clock}` : '^'}|${ro ? `${ro.client}:${ro.clock}` : '$'}`;
    let g = groups.get(key);
    if (g === undefined) groups.set(key, (g = []));
    g.push({ client: n.id.client, clock: n.id.clock, by: '' });
  }
  const out: Array<[EditMark, EditMark]> = [];
  for (const g of groups.values()) {
    if (g.length < 2) continue;
    for (let i = 0; i < g.length; i++) {
      for (let j = i + 1; j < g.length; j++) if (g[i]!.client !== g[j]!.client) out.push([g[i]!, g[j]!]);
    }
  }
  return out;
}

/** All unsettled definition races in the codebook, one flag per (code, field). */
export function definitionRaceFlags(cb: Y.Doc): Flag[] {
  const flags: Flag[] = [];
  const byField = new Map<string, FieldEditRecord[]>();
  for (const r of listFieldEdits(cb)) {
    const k = `${r.codeId}\u0000${r.field}`;
    let l = byField.get(k);
    if (l === undefined) byField.set(k, (l = []));
    l.push(r);
  }
  const cache = new Map<FieldEditRecord, Map<number, number>>();
  codesMap(cb).forEach((m, codeId) => {
    if (!(m instanceof Y.Map)) return;
    for (const field of DEFINITION_FIELDS) {
      const t = m.get(field);
      if (!(t instanceof Y.Text)) continue;
      const records = byField.get(`${codeId}\u0000${field}`) ?? [];
      const byClient = new Map<number, string>(records.map((r) => [r.client, r.by]));
      const pairs: Array<[EditMark, EditMark]> = [];
      for (let i = 0; i < records.length; i++) {
        for (let j = i + 1; j < records.length; j++) {
          const a = records[i]!;
          const b = records[j]!;
          if (a.client === b.client) continue;
          // the last clock of each run: an edit there is the one least likely to have been seen
          const ma = { client: a.client, clock: a.to - 1, by: a.by };
          const mb = { client: b.client, clock: b.to - 1, by: b.by };
          if (!saw(decodeSeen(a, cache), mb) && !saw(decodeSeen(b, cache), ma)) pairs.push([ma, mb]);
        }
      }
      for (const [x, y] of sameGapPairs(t)) {
        pairs.push([{ ...x, by: byClient.get(x.client) ?? '' }, { ...y, by: byClient.get(y.client) ?? '' }]);
      }
      const open = pairs.filter(([x, y]) => !records.some((r) => saw(decodeSeen(r, cache), x) && saw(decodeSeen(r, cache), y)));
      if (open.length === 0) continue;
      const people = [...new Set(open.flatMap(([x, y]) => [x.by || `client ${x.client}`, y.by || `client ${y.client}`]))].sort();
      flags.push({
        kind: 'definition-race',
        key: `definition-race:${codeId}:${field}`,
        segments: [],
        codeIds: [codeId],
        field,
        people,
        detail: `${open.length} concurrent edit pair(s)`,
      });
    }
  });
  return flags;
}

export type { DefinitionField };
