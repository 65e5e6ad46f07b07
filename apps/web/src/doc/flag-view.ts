/**
 * Turns the model's flags (which name segments, not offsets) into what the coding view draws: where
 * the flag sits now (from its segments' current resolution) and a sentence in plain words.
 */
import type { CodeView, Flag as ModelFlag, FlagKind, ResolvedSegment } from '@gloss/model';

export type { FlagKind };
/** A resolved segment with the coder whose layer holds it and its note. */
export type Segment = ResolvedSegment & { coderId: string; note?: string };

export interface Flag { id: string; kind: FlagKind; start: number; end: number; segmentIds: string[]; message: string }

export function viewFlags(flags: readonly ModelFlag[], segments: ReadonlyMap<string, Segment>, codes: ReadonlyMap<string, Pick<CodeView, 'label' | 'status'>>): Flag[] {
  const label = (id: string | undefined) => `“${(id && codes.get(id)?.label) || 'an unknown code'}”`;
  const out: Flag[] = [];
  for (const f of flags) {
    const segs = f.segments.map((r) => segments.get(r.segmentId)).filter((s): s is Segment => !!s);
    const start = segs.length ? Math.max(...segs.map((s) => s.start)) : 0;
    const end = segs.length ? Math.max(start, Math.min(...segs.map((s) => s.end))) : 0;
    const [a, b] = f.codeIds.length ? f.codeIds : segs.map((s) => s.codeId);
    let message: string;
    switch (f.kind) {
      case 'exclusive': message = `${label(a)} and ${label(b)} exclude each other on the same words.`; break;
      case 'duplicate': message = `${label(a)} twice on the same words by one coder.`; break;
      case 'retired-code': message = `${label(a)} is ${codes.get(a ?? '')?.status ?? 'retired'}: recode this segment.`; break;
      case 'orphaned': message = `A ${label(a)} segment lost all its words.`; break;
      case 'disagreement': message = `Coders differ here: ${[...new Set(f.codeIds)].map(label).join(' and ')}.`; break;
      case 'definition-race': message = `Two people changed ${f.field ?? 'a field'} of ${label(a)} at the same time.`; break;
      case 'stale-definition': message = `The definition of ${label(a)} changed after this was coded: re-check it.`; break;
    }
    out.push({ id: f.key, kind: f.kind, start, end, segmentIds: segs.map((s) => s.id), message });
  }
  return out.sort((x, y) => x.start - y.start);
}
