/**
 * Gathers the facts of a round report (rounds/report.ts) from the database and the documents:
 * the agreement over exactly the round (agreement/compute.ts with the round's participants, texts,
 * unit and statistic), the consensus layers' segments and reasons, the codebook changes stamped with
 * the round, and how much of the study was double-coded.
 */
import { type Db, type RoundRow, documents, memberships, rounds, studies, texts, users } from '@gloss/db';
import { getCodes, listChanges, listSegments, readTurns, resolveSegments } from '@gloss/model';
import { and, eq, inArray, lte } from 'drizzle-orm';
import type * as Y from 'yjs';
import { computeAgreement } from '../agreement/compute.js';
import type { HeavyWork } from '../heavy/pool.js';
import type { Statistic } from '../agreement/statistics.js';
import type { UnitKind } from '../agreement/units.js';
import { notFound } from '../errors.js';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import { doneMarks, roundLayers, type RoundMembers } from './records.js';
import { INDEPENDENCE, REPORT_CAUTION, REPORT_SOURCES, unitDescription, type Coef, type RoundReport } from './report.js';

export interface RoundAgreementOptions {
  codes?: string[] | undefined;
  bootstrap?: { replicates: number; seed: number; scheme?: 'texts' | 'units' } | undefined;
  /** Where the coefficients are computed (a worker thread in the server); default in place. */
  heavy?: HeavyWork | undefined;
}

/** The agreement report over exactly the round: its texts, its participants' round layers, its unit and statistic. */
export async function roundAgreement(db: Db, store: DocLoader, round: RoundRow, members: RoundMembers, opts: RoundAgreementOptions = {}) {
  const [study] = await db.select().from(studies).where(eq(studies.id, round.studyId));
  if (!study) throw notFound('Study');
  const layers = await roundLayers(db, round.id);
  const textDocs = members.texts.length
    ? await db.select({ id: documents.id, textId: documents.textId }).from(documents).where(and(inArray(documents.textId, members.texts.map((t) => t.id)), eq(documents.kind, 'text')))
    : [];
  const [cb] = await db.select({ id: documents.id }).from(documents).where(and(eq(documents.studyId, round.studyId), eq(documents.kind, 'codebook')));
  const { body, coderIds } = await computeAgreement(db, store, {
    studyId: round.studyId,
    mode: study.mode,
    texts: members.texts.map((t) => ({ id: t.id, title: t.title, textDocId: textDocs.find((d) => d.textId === t.id)!.id })),
    layers: layers.filter((l) => l.coderId !== null).map((l) => ({ id: l.id, textId: l.textId!, coderId: l.coderId! })),
    choice: { participants: members.participants.map((p) => p.id) },
    codebookDocId: cb?.id ?? null,
    unit: round.unit as UnitKind,
    statistic: round.statistic as Statistic,
    codes: opts.codes,
    bootstrap: opts.bootstrap,
  }, opts.heavy);
  return { body: { ...body, round: { id: round.id, number: round.number, name: round.name, phase: round.phase } }, coderIds, study };
}

type Block = { value: number | null; ci?: [number, number] | null; band?: string; reason?: string };
const coef = (b: Block | undefined): Coef => ({ value: b?.value ?? null, ...(b?.ci !== undefined ? { ci: b.ci } : {}), ...(b?.band ? { band: b.band } : {}), ...(b?.reason ? { reason: b.reason } : {}) });

export async function roundReport(db: Db, store: DocLoader, round: RoundRow, members: RoundMembers, heavy?: HeavyWork): Promise<RoundReport> {
  // Intervals: percentile bootstrap over units (Hayes & Krippendorff 2007 resample units), alpha only.
  const alpha = round.statistic === 'krippendorff-alpha' && round.unit !== 'span';
  const { body, study } = await roundAgreement(db, store, round, members, { heavy, ...(alpha ? { bootstrap: { replicates: 1000, seed: 1, scheme: 'units' as const } } : {}) });
  const b = body as unknown as {
    coders: Array<{ id: string; name: string }>;
    codes: Array<{ id: string; label: string }>;
    pooled?: Block;
    perCode?: Array<{ codeId: string; result: Block }>;
    perCoderPair?: Array<{ coders: [string, string]; result: Block }>;
    method?: string;
    differences?: unknown[];
    note?: string;
  };
  const names = new Map(members.participants.map((p) => [p.id, p.name]));
  const labels = new Map(b.codes.map((c) => [c.id, c.label]));

  const roles = await db
    .select({ userId: memberships.userId, role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.studyId, round.studyId), inArray(memberships.userId, members.participants.map((p) => p.id))));
  const marks = await doneMarks(db, round.id);
  const layers = await roundLayers(db, round.id);
  const allTexts = await db.select({ id: texts.id, words: texts.wordCount }).from(texts).where(eq(texts.studyId, round.studyId));
  const [{ n } = { n: 0 }] = await db.select({ n: rounds.number }).from(rounds).where(and(eq(rounds.studyId, round.studyId), lte(rounds.number, round.number))).orderBy(rounds.number).then((r) => [{ n: r.length }]);

  // Segments per participant, and the consensus layers' segments with their reasons (the segment's note).
  const textDocs = await db.select({ id: documents.id, textId: documents.textId }).from(documents).where(and(inArray(documents.textId, members.texts.map((t) => t.id)), eq(documents.kind, 'text')));
  const [cbRow] = await db.select({ id: documents.id }).from(documents).where(and(eq(documents.studyId, round.studyId), eq(documents.kind, 'codebook')));
  const segmentsBy = new Map<string, number>();
  const items: RoundReport['consensus']['items'] = [];
  for (const t of members.texts) {
    const own = layers.filter((l) => l.textId === t.id);
    const textDoc = textDocs.find((d) => d.textId === t.id);
    if (!textDoc) continue;
    await withDocs(store, [textDoc.id, ...own.map((l) => l.id)], ([text, ...docs]) => {
      const turns = readTurns(text!);
      own.forEach((l, i) => {
        const records = listSegments(docs[i]!);
        const notes = new Map(records.map((r) => [r.id, r.note]));
        const segs = resolveSegments(text!, records, turns).filter((s) => !s.unresolved);
        if (l.coderId) segmentsBy.set(l.coderId, (segmentsBy.get(l.coderId) ?? 0) + segs.length);
        else for (const s of segs) items.push({ textId: t.id, codeId: s.codeId, label: labels.get(s.codeId) ?? '', quote: s.quote, reason: notes.get(s.id) || null });
      });
    });
  }
  let changes: RoundReport['codebook']['changes'] = [];
  if (cbRow) {
    changes = await withDocs(store, [cbRow.id], ([cb]) => {
      const codeLabels = new Map(getCodes(cb as Y.Doc).map((c) => [c.id, c.label]));
      return listChanges(cb!)
        .filter((c) => c.round === round.number)
        .map((c) => ({ at: new Date(c.at).toISOString(), by: c.by, kind: c.kind, codes: c.codeIds.map((id) => codeLabels.get(id) ?? id), field: c.field ?? null, reason: c.reason ?? null, detail: c.detail ?? null }));
    });
    const byIds = [...new Set(changes.map((c) => c.by))].filter((id) => /^[0-9a-f-]{36}$/i.test(id));
    const people = byIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, byIds)) : [];
    changes = changes.map((c) => ({ ...c, by: people.find((p) => p.id === c.by)?.name ?? c.by }));
  }

  const roundWords = members.texts.reduce((s, t) => s + t.wordCount, 0);
  const studyWords = allTexts.reduce((s, t) => s + t.words, 0);
  const withReason = items.filter((i) => i.reason).length;
  const reflexive = study.mode === 'reflexive';
  return {
    round: { id: round.id, number: round.number, name: round.name, purpose: round.purpose, phase: round.phase, startedAt: round.createdAt.toISOString(), revealedAt: round.revealedAt?.toISOString() ?? null, closedAt: round.closedAt?.toISOString() ?? null },
    study: { id: study.id, title: study.title, mode: study.mode, roundsSoFar: n },
    coders: members.participants.map((p) => ({ id: p.id, name: p.name, role: roles.find((r) => r.userId === p.id)?.role ?? 'former member', textsDone: marks.filter((m) => m.userId === p.id).length, segments: segmentsBy.get(p.id) ?? 0 })),
    independence: INDEPENDENCE,
    unit: { kind: round.unit, description: unitDescription(round.unit) },
    statistic: round.unit === 'span' ? 'unitizing-alpha' : round.statistic,
    doubleCoded: { texts: members.texts.length, studyTexts: allTexts.length, words: roundWords, studyWords, share: studyWords > 0 ? roundWords / studyWords : null },
    coefficients: reflexive
      ? null
      : {
          method: b.method ?? '',
          interval: alpha ? '95 % percentile bootstrap intervals, 1,000 resamples of units, seed 1 (Hayes & Krippendorff 2007).' : 'No interval is computed for this statistic.',
          pooled: coef(b.pooled),
          perCode: (b.perCode ?? []).map((c) => ({ codeId: c.codeId, label: labels.get(c.codeId) ?? '', ...coef(c.result) })),
          perCoderPair: (b.perCoderPair ?? []).map((p) => ({ coders: p.coders.map((id) => names.get(id) ?? id) as [string, string], ...coef(p.result) })),
        },
    ...(reflexive ? { reflexiveNote: b.note ?? '', differences: (b.differences ?? []).length } : {}),
    consensus: {
      segments: items.length,
      withReason,
      description:
        items.length === 0
          ? 'No consensus segments were adjudicated in this round.'
          : `The lead adjudicated ${items.length} consensus segment${items.length === 1 ? '' : 's'} after the reveal (taking one coder’s segment, several, or a new one), ${withReason} with a reason recorded.`,
      items,
    },
    codebook: { versionId: round.codebookVersionId, changes },
    caution: REPORT_CAUTION,
    sources: REPORT_SOURCES,
  };
}
