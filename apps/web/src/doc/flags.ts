/**
 * Flags on one open text, computed from resolved segments and the codebook (DESIGN §4).
 * Overlaps are found with one sweep over segments sorted by start, so thousands of segments stay cheap.
 */
import type { CodeGroup, CodeView, ResolvedSegment } from '@gloss/model';

/** A resolved segment with the coder whose layer holds it. */
export type Segment = ResolvedSegment & { coderId: string; note?: string };
type Code = Pick<CodeView, 'id' | 'label' | 'status'>;
type ExclusiveSet = CodeGroup;

export type FlagKind = 'exclusive' | 'duplicate' | 'retired-code' | 'orphaned' | 'disagreement';
export interface Flag { id: string; kind: FlagKind; start: number; end: number; segmentIds: string[]; message: string }

export function computeFlags(segments: Segment[], codes: Code[], exclusiveSets: ExclusiveSet[], opts: { showDisagreement: boolean }): Flag[] {
  const flags: Flag[] = [];
  const byId = new Map(codes.map((c) => [c.id, c]));
  const label = (id: string) => byId.get(id)?.label ?? 'an unknown code';
  const setOf = new Map<string, ExclusiveSet[]>();
  for (const s of exclusiveSets) for (const c of s.codeIds) setOf.set(c, [...(setOf.get(c) ?? []), s]);

  for (const s of segments) {
    if (s.unresolved) continue;
    if (s.orphaned) flags.push({ id: `orphaned:${s.id}`, kind: 'orphaned', start: s.start, end: s.start, segmentIds: [s.id], message: `A “${label(s.codeId)}” segment lost all its words.` });
    const c = byId.get(s.codeId);
    if (c && (c.status === 'retired' || c.status === 'merged'))
      flags.push({ id: `retired:${s.id}`, kind: 'retired-code', start: s.start, end: s.end, segmentIds: [s.id], message: `“${c.label}” is ${c.status}; recode this segment.` });
  }

  const live = segments.filter((s) => !s.orphaned && !s.unresolved).sort((a, b) => a.start - b.start);
  const active: Segment[] = [];
  for (const s of live) {
    for (let i = active.length - 1; i >= 0; i--) if (active[i]!.end <= s.start) active.splice(i, 1);
    for (const o of active) {
      const start = s.start;
      const end = Math.min(s.end, o.end);
      const pair = [o.id, s.id].sort();
      if (o.codeId === s.codeId && o.coderId === s.coderId) {
        flags.push({ id: `duplicate:${pair.join(':')}`, kind: 'duplicate', start, end, segmentIds: pair, message: `“${label(s.codeId)}” twice on the same words.` });
      } else if (o.codeId !== s.codeId) {
        const shared = (setOf.get(o.codeId) ?? []).find((x) => x.codeIds.includes(s.codeId));
        if (shared) flags.push({ id: `exclusive:${pair.join(':')}`, kind: 'exclusive', start, end, segmentIds: pair, message: `“${label(o.codeId)}” and “${label(s.codeId)}” exclude each other (${shared.label || 'exclusive set'}).` });
        else if (opts.showDisagreement && o.coderId !== s.coderId)
          flags.push({ id: `disagreement:${pair.join(':')}`, kind: 'disagreement', start, end, segmentIds: pair, message: `Coders differ here: “${label(o.codeId)}” and “${label(s.codeId)}”.` });
      }
    }
    active.push(s);
  }
  return flags.sort((a, b) => a.start - b.start);
}
