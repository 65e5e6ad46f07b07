import type { CodebookFacts } from './codebook-facts.js';
import { roundOf } from './codebook-facts.js';
import type { IntervalIndex } from './interval-index.js';
import { refOf, segKey, type Flag, type FlagSegment } from './types.js';

/**
 * The segment flag rules (DESIGN §4). Each function returns the flags *owned* by one segment: the
 * incremental engine drops and recomputes exactly those when the segment or its neighbourhood changes.
 * Pair flags (exclusive, duplicate) are owned by both segments and keyed by the sorted pair.
 */

export interface RuleOptions {
  /** During independent coding no coder may see another's choices: no disagreement flags. */
  independentCoding: boolean;
}

const pairKey = (kind: string, a: FlagSegment, b: FlagSegment) => {
  const ka = segKey(a.layerId, a.id);
  const kb = segKey(b.layerId, b.id);
  return `${kind}:${ka < kb ? `${ka}|${kb}` : `${kb}|${ka}`}`;
};

const ordered = (s: FlagSegment, o: FlagSegment): [FlagSegment, FlagSegment] =>
  segKey(s.layerId, s.id) < segKey(o.layerId, o.id) ? [s, o] : [o, s];

/** orphaned, retired-code, stale-definition */
export function singleSegmentFlags(s: FlagSegment, facts: CodebookFacts): Flag[] {
  const out: Flag[] = [];
  const ref = [refOf(s)];
  const k = `${s.layerId}:${s.id}`;
  if (s.orphaned) out.push({ kind: 'orphaned', key: `orphaned:${k}`, segments: ref, codeIds: [s.codeId], people: [s.coder] });
  const status = facts.status.get(s.codeId);
  if (status === 'merged' || status === 'retired') {
    const into = facts.effective.get(s.codeId);
    out.push({
      kind: 'retired-code', key: `retired-code:${k}`, segments: ref,
      codeIds: into !== undefined && into !== s.codeId ? [s.codeId, into] : [s.codeId], people: [s.coder],
      detail: status === 'merged' ? `code was merged into ${into}` : 'code was retired',
    });
  }
  const changes = facts.definitionChanges.get(s.codeId);
  if (changes !== undefined && changes.length > 0) {
    const coded = roundOf(facts, s);
    const since = Math.max(s.createdAt, s.checkedAt ?? 0);
    let last: { at: number; field: string } | undefined;
    for (const c of changes) if (c.round > coded && c.at > since) last = c;
    if (last !== undefined) {
      out.push({
        kind: 'stale-definition', key: `stale-definition:${k}`, segments: ref, codeIds: [s.codeId],
        field: last.field, people: [s.coder], detail: `coded in round ${coded}; definition changed since`,
      });
    }
  }
  return out;
}

/** exclusive, duplicate, disagreement — found through the overlap index. */
export function overlapFlags(s: FlagSegment, index: IntervalIndex, facts: CodebookFacts, opts: RuleOptions): Flag[] {
  if (s.orphaned || s.unresolved) return [];
  const out: Flag[] = [];
  const mySets = facts.exclusiveSets.get(s.effectiveCode);
  // disagreement bookkeeping: per other coder, their overlapping segments and whether one carries my code
  const others = new Map<string, { refs: FlagSegment[]; same: boolean }>();
  index.overlapping(s.start, s.end, (o) => {
    if (o.layerId === s.layerId && o.id === s.id) return;
    if (o.layerId === s.layerId && o.effectiveCode === s.effectiveCode) {
      const [a, b] = ordered(s, o);
      out.push({ kind: 'duplicate', key: pairKey('duplicate', s, o), segments: [refOf(a), refOf(b)], codeIds: [s.effectiveCode], people: [s.coder] });
    }
    if (mySets !== undefined && o.effectiveCode !== s.effectiveCode) {
      const theirs = facts.exclusiveSets.get(o.effectiveCode);
      const shared = theirs?.filter((x) => mySets.includes(x));
      if (shared !== undefined && shared.length > 0) {
        const [a, b] = ordered(s, o);
        out.push({
          kind: 'exclusive', key: pairKey('exclusive', s, o), segments: [refOf(a), refOf(b)],
          codeIds: [a.effectiveCode, b.effectiveCode], people: [...new Set([a.coder, b.coder])], detail: shared.join(','),
        });
      }
    }
    if (!opts.independentCoding && o.coder !== s.coder) {
      let e = others.get(o.coder);
      if (e === undefined) others.set(o.coder, (e = { refs: [], same: false }));
      e.refs.push(o);
      if (o.effectiveCode === s.effectiveCode) e.same = true;
    }
  });
  for (const [coder, e] of others) {
    if (e.same) continue;
    const refs = e.refs.sort((a, b) => a.start - b.start || (a.id < b.id ? -1 : 1));
    out.push({
      kind: 'disagreement', key: `disagreement:${s.layerId}:${s.id}:${coder}`,
      segments: [refOf(s), ...refs.map(refOf)],
      codeIds: [s.effectiveCode, ...new Set(refs.map((r) => r.effectiveCode))],
      people: [s.coder, coder],
      detail: `${coder} coded this passage without ${s.effectiveCode}`,
    });
  }
  return out;
}
