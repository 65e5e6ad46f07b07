/**
 * Turns the model's flags (which name segments, not offsets) into what the coding view draws: where
 * each flag sits now (from its segments' current resolution), and, only when shown, a sentence in plain
 * words. `placeFlags` runs in the flags worker, so the page receives small records ready to draw.
 */
import type { CodeView, Flag as ModelFlag, FlagKind, ResolvedSegment } from '@gloss/model';

export type { FlagKind };
/** A resolved segment with the coder whose layer holds it and its note. */
export type Segment = ResolvedSegment & { coderId: string; note?: string };

export interface Flag { id: string; kind: FlagKind; start: number; end: number; segmentIds: string[]; codeIds: string[]; field?: string }

/** Flags with the offsets of the words they are about (the overlap of their segments), sorted by place. */
export function placeFlags(flags: readonly ModelFlag[], segments: ReadonlyMap<string, { start: number; end: number; codeId: string }>): Flag[] {
  const out: Flag[] = [];
  for (const f of flags) {
    let start = 0;
    let end = Infinity;
    const ids: string[] = [];
    const codes: string[] = [];
    for (const r of f.segments) {
      const s = segments.get(r.segmentId);
      if (!s) continue;
      ids.push(r.segmentId);
      codes.push(s.codeId);
      start = Math.max(start, s.start);
      end = Math.min(end, s.end);
    }
    if (end === Infinity || end < start) end = start;
    const flag: Flag = { id: f.key, kind: f.kind, start, end, segmentIds: ids, codeIds: f.codeIds.length ? f.codeIds : codes };
    if (f.field) flag.field = f.field;
    out.push(flag);
  }
  return out.sort((x, y) => x.start - y.start);
}

/** The flag in plain words, naming its codes. */
export function describeFlag(f: Flag, codes: ReadonlyMap<string, Pick<CodeView, 'label' | 'status'>>): string {
  const label = (id: string | undefined) => `“${(id && codes.get(id)?.label) || 'an unknown code'}”`;
  const [a, b] = f.codeIds;
  switch (f.kind) {
    case 'exclusive': return `${label(a)} and ${label(b)} exclude each other on the same words.`;
    case 'duplicate': return `${label(a)} twice on the same words by one coder.`;
    case 'retired-code': return `${label(a)} is ${codes.get(a ?? '')?.status ?? 'retired'}: recode this segment.`;
    case 'orphaned': return `A ${label(a)} segment lost all its words.`;
    case 'disagreement': return `Coders differ here: ${[...new Set(f.codeIds)].map(label).join(' and ')}.`;
    case 'definition-race': return `Two people changed ${f.field ?? 'a field'} of ${label(a)} at the same time.`;
    case 'stale-definition': return `The definition of ${label(a)} changed after this was coded: re-check it.`;
  }
}
