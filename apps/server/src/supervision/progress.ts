/**
 * Progress across rounds (issue 9 item 6): for each trainee, each round they took part in (revealed
 * or closed: nothing is compared while coding is still independent), their round layers against the
 * reference — the text's chosen reference layer, or else the round's consensus layer on that text —
 * with the round's unit and statistic (agreement/compute.ts, the two layers as two coders), and the
 * comparison categories counted (packages/model comparison.ts). Drift: the value fell by more than the
 * supervisor's threshold since the trainee's previous round with a value. In a reflexive study no
 * coefficient is computed, only the counts.
 */
import { type Db, documents, memberships, studies, textReferences } from '@gloss/db';
import { compareLayers, type Comparison, listSegments, readText, readTurns, resolveSegments } from '@gloss/model';
import { and, eq, inArray } from 'drizzle-orm';
import { computeAgreement } from '../agreement/compute.js';
import type { Statistic } from '../agreement/statistics.js';
import type { UnitKind } from '../agreement/units.js';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import { roundLayers, roundMembers, roundsOfStudy } from '../rounds/records.js';
import { isDrift, pointValue, sumCounts, type CategoryCounts } from './progress-point.js';

export type { CategoryCounts } from './progress-point.js';

export interface ProgressPoint {
  roundId: string;
  roundNumber: number;
  roundName: string;
  statistic: string;
  unit: string;
  /** null: no coefficient (reflexive study, no reference, or not computable — see `note`). */
  value: number | null;
  counts: CategoryCounts;
  /** Texts of the round compared (with a reference and a layer of the trainee). */
  texts: number;
  drift: boolean;
  note?: string;
}

export interface TraineeProgress {
  userId: string;
  name: string;
  points: ProgressPoint[];
}

export const PROGRESS_SOURCES =
  'Agreement: the round’s statistic between the trainee’s round layers and the reference (see the agreement report for each statistic’s source). Categories: common practice in supervised coding review (definitions with the comparison). Drift threshold: the supervisor’s own choice.';

export async function traineeProgress(db: Db, store: DocLoader, studyId: string, opts: { toleranceWords: number; driftThreshold: number }): Promise<{ mode: string; trainees: TraineeProgress[] }> {
  const [study] = await db.select({ mode: studies.mode }).from(studies).where(eq(studies.id, studyId));
  const reflexive = study?.mode === 'reflexive';
  const trainees = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.studyId, studyId), eq(memberships.role, 'trainee')));
  const traineeIds = new Set(trainees.map((t) => t.userId));
  const rounds = (await roundsOfStudy(db, studyId)).filter((r) => r.phase !== 'independent');
  const members = await roundMembers(db, rounds.map((r) => r.id));
  const [cb] = await db.select({ id: documents.id }).from(documents).where(and(eq(documents.studyId, studyId), eq(documents.kind, 'codebook')));
  const allTextIds = [...new Set([...members.values()].flatMap((m) => m.texts.map((t) => t.id)))];
  const refs = allTextIds.length ? await db.select().from(textReferences).where(inArray(textReferences.textId, allTextIds)) : [];
  const textDocs = allTextIds.length
    ? await db.select({ id: documents.id, textId: documents.textId }).from(documents).where(and(eq(documents.kind, 'text'), inArray(documents.textId, allTextIds)))
    : [];
  const names = new Map<string, string>();
  const out = new Map<string, TraineeProgress>();

  for (const round of rounds) {
    const m = members.get(round.id)!;
    const layers = await roundLayers(db, round.id);
    for (const p of m.participants) {
      if (!traineeIds.has(p.id)) continue;
      names.set(p.id, p.name);
      // Pairs per text: the trainee's round layer and the reference layer.
      const pairs = m.texts.flatMap((t) => {
        const mine = layers.find((l) => l.textId === t.id && l.coderId === p.id);
        const ref = refs.find((r) => r.textId === t.id)?.layerDocId ?? layers.find((l) => l.textId === t.id && l.coderId === null)?.id;
        const textDocId = textDocs.find((d) => d.textId === t.id)?.id;
        return mine && ref && textDocId ? [{ text: t, mine: mine.id, ref, textDocId }] : [];
      });
      const comparisons: Comparison[] = [];
      for (const pair of pairs) {
        await withDocs(store, [pair.textDocId, pair.mine, pair.ref], ([textDoc, mine, ref]) => {
          const turns = readTurns(textDoc!);
          const placed = (d: typeof mine) =>
            resolveSegments(textDoc!, listSegments(d!), turns)
              .filter((s) => !s.unresolved)
              .map((s) => ({ id: s.id, codeId: s.codeId, start: s.start, end: s.end }));
          comparisons.push(compareLayers(readText(textDoc!), placed(mine), placed(ref), opts.toleranceWords));
        });
      }
      const counts = sumCounts(comparisons);
      const { value, note } = await pointValue({ reflexive, texts: pairs.length, compute: async () => {
        // The reference takes part as a second coder under the study's id: a uuid (the coder lookup
        // queries a uuid column) that names no person, the same on every text of the round.
        const refCoder = studyId;
        const { body } = await computeAgreement(db, store, {
          studyId,
          mode: 'standard',
          texts: pairs.map((x) => ({ id: x.text.id, title: x.text.title, textDocId: x.textDocId })),
          layers: pairs.flatMap((x) => [
            { id: x.mine, textId: x.text.id, coderId: p.id },
            { id: x.ref, textId: x.text.id, coderId: refCoder },
          ]),
          choice: { coders: [p.id, refCoder] },
          codebookDocId: cb?.id ?? null,
          unit: round.unit as UnitKind,
          statistic: round.statistic as Statistic,
        }).catch((err: unknown) => ({ body: { pooled: { value: null, reason: err instanceof Error ? err.message : String(err) } } as Record<string, unknown> }));
        const pooled = body.pooled as { value: number | null; reason?: string } | undefined;
        return { value: pooled?.value ?? null, reason: pooled?.reason };
      } });
      const entry = out.get(p.id) ?? { userId: p.id, name: p.name, points: [] };
      const drift = isDrift(entry.points, value, opts.driftThreshold);
      entry.points.push({
        roundId: round.id,
        roundNumber: round.number,
        roundName: round.name,
        statistic: round.statistic,
        unit: round.unit,
        value,
        counts,
        texts: pairs.length,
        drift,
        ...(note ? { note } : {}),
      });
      out.set(p.id, entry);
    }
  }
  return { mode: reflexive ? 'reflexive' : 'standard', trainees: [...out.values()].sort((a, b) => a.name.localeCompare(b.name)) };
}
