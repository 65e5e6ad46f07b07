import * as Y from 'yjs';
import { changesArray, codesMap, DEFINITION_FIELDS, listExclusiveSets, type CodeStatus } from '../codebook-doc.js';
import { effectiveCodeId } from '../codebook-ops.js';
import { listFieldEdits } from '../field-edits.js';

/** What the segment flag rules need from the codebook, read once per codebook change. */
export interface CodebookFacts {
  status: Map<string, CodeStatus>;
  effective: Map<string, string>;
  /** code id -> ids of the mutually exclusive sets it belongs to */
  exclusiveSets: Map<string, string[]>;
  /** code id -> definition changes (time, round, field), newest last */
  definitionChanges: Map<string, Array<{ at: number; round: number; field: string }>>;
  /** start times of rounds 1, 2, ... (from the change log) */
  roundStarts: number[];
  /** per code, a string that changes whenever anything above changes for that code */
  signature: Map<string, string>;
}

export function readCodebookFacts(cb: Y.Doc): CodebookFacts {
  const status = new Map<string, CodeStatus>();
  const effective = new Map<string, string>();
  codesMap(cb).forEach((m, id) => {
    if (!(m instanceof Y.Map)) return;
    status.set(id, (m.get('status') as CodeStatus) ?? 'active');
    effective.set(id, effectiveCodeId(cb, id));
  });
  const exclusiveSets = new Map<string, string[]>();
  for (const set of listExclusiveSets(cb)) {
    for (const c of set.codeIds) {
      const l = exclusiveSets.get(c) ?? [];
      l.push(set.id);
      exclusiveSets.set(c, l);
    }
  }
  const definitionChanges = new Map<string, Array<{ at: number; round: number; field: string }>>();
  const addChange = (codeId: string, at: number, round: number, field: string) => {
    const l = definitionChanges.get(codeId) ?? [];
    l.push({ at, round, field });
    definitionChanges.set(codeId, l);
  };
  const roundStarts: number[] = [];
  for (const c of changesArray(cb).toArray()) {
    if (c.kind === 'round') roundStarts.push(c.at);
    if (c.kind === 'edit' && c.field !== undefined && (DEFINITION_FIELDS as readonly string[]).includes(c.field)) {
      for (const id of c.codeIds) addChange(id, c.at, c.round, c.field);
    }
  }
  for (const r of listFieldEdits(cb)) addChange(r.codeId, r.at, r.round, r.field);
  for (const l of definitionChanges.values()) l.sort((a, b) => a.at - b.at);
  roundStarts.sort((a, b) => a - b);
  const signature = new Map<string, string>();
  const ids = new Set([...status.keys(), ...exclusiveSets.keys(), ...definitionChanges.keys()]);
  for (const id of ids) {
    const d = definitionChanges.get(id) ?? [];
    signature.set(id, `${status.get(id)}|${effective.get(id)}|${(exclusiveSets.get(id) ?? []).join(',')}|${d.length}:${d.map((x) => `${x.at}/${x.round}`).join(',')}`);
  }
  return { status, effective, exclusiveSets, definitionChanges, roundStarts, signature };
}

/** The round a segment was coded in: its own `round`, else the number of rounds started before it. */
export function roundOf(facts: CodebookFacts, seg: { round?: number; createdAt: number }): number {
  if (seg.round !== undefined) return seg.round;
  let n = 0;
  for (const t of facts.roundStarts) if (t <= seg.createdAt) n++;
  return n;
}
