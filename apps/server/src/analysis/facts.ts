/**
 * Reading the relational projection for analysis: which layers the caller may read (the role table,
 * through roomAccess, so rounds narrow it in one place), the study's codes and cases, and the segment
 * facts matching a filter. The projection follows the documents about a second behind.
 */
import {
  type Db,
  documents,
  projectedCaseTexts,
  projectedCaseValues,
  projectedCases,
  projectedCodes,
  projectedSegments,
  rounds,
  texts,
  users,
} from '@gloss/db';
import { and, asc, eq, inArray } from 'drizzle-orm';
import { documentAccess } from '../access/policy.js';
import { studyRounds } from '../access/rounds.js';
import { studySupervision } from '../access/supervision.js';
import type { Role } from '../sync/contracts.js';
import type { CaseFact, SegmentFact } from './tables.js';

export interface CodeInfo {
  id: string;
  label: string;
  parentId: string | null;
  colour: string;
  status: string;
}

export interface CaseInfo extends CaseFact {
  name: string;
}

/**
 * A readable layer: a coder's (outside rounds or in a round), or a round's consensus layer (no coder).
 * `round` is the round's number when the layer belongs to one.
 */
export interface LayerInfo {
  id: string;
  kind: 'coder' | 'consensus';
  coderId: string | null;
  round: { id: string; number: number; name: string; phase: string } | null;
}

/** Layer documents of the study the caller may read. */
export async function readableLayers(db: Db, studyId: string, role: Role, me: string): Promise<LayerInfo[]> {
  const rows = await db
    .select({ id: documents.id, coderId: documents.coderId, roundId: documents.roundId, textId: documents.textId })
    .from(documents)
    .where(and(eq(documents.studyId, studyId), eq(documents.kind, 'layer')));
  // Rounds narrow who reads which layer (an independent phase hides others' coding, and a consensus
  // layer opens at the reveal): the one rule in access/.
  const { byId, openByText } = await studyRounds(db, studyId);
  const supervision = await studySupervision(db, studyId, me);
  const readable = rows.filter(
    (r) => documentAccess(role, { id: r.id, kind: 'layer', coderId: r.coderId, roundId: r.roundId }, me, { openRound: openByText.get(r.textId ?? '') ?? null, layerRound: r.roundId ? (byId.get(r.roundId) ?? null) : null }, supervision.of(r.textId)).read,
  );
  const roundIds = [...new Set(readable.map((r) => r.roundId).filter((x): x is string => x !== null))];
  const named = roundIds.length ? await db.select({ id: rounds.id, number: rounds.number, name: rounds.name, phase: rounds.phase }).from(rounds).where(inArray(rounds.id, roundIds)) : [];
  const roundOf = new Map(named.map((r) => [r.id, r]));
  return readable.map((r) => ({ id: r.id, kind: r.coderId === null ? 'consensus' : 'coder', coderId: r.coderId, round: r.roundId ? (roundOf.get(r.roundId) ?? null) : null }));
}

/**
 * Which layers a filter keeps: `source` coders (every coder's layer) or consensus (rounds' consensus
 * layers, readable once a round is revealed); `round` a round's number: that round's layers, and layers
 * outside rounds (whose segments may carry the round their coder's client recorded; segmentFacts checks).
 */
export function chooseLayers(layers: readonly LayerInfo[], f: { source?: 'all' | 'coders' | 'consensus'; round?: number }): LayerInfo[] {
  return layers.filter(
    (l) =>
      (f.source === undefined || f.source === 'all' || (f.source === 'coders') === (l.kind === 'coder')) &&
      (f.round === undefined || l.round === null || l.round.number === f.round),
  );
}

export async function studyCodes(db: Db, studyId: string): Promise<CodeInfo[]> {
  return db
    .select({ id: projectedCodes.id, label: projectedCodes.label, parentId: projectedCodes.parentId, colour: projectedCodes.colour, status: projectedCodes.status })
    .from(projectedCodes)
    .where(eq(projectedCodes.studyId, studyId))
    .orderBy(asc(projectedCodes.createdAt), asc(projectedCodes.id));
}

/** A code and every code under it (a cycle cannot loop: each code is taken once). */
export function withDescendants(codes: readonly CodeInfo[], id: string): string[] {
  const out = new Set([id]);
  for (let grew = true; grew; ) {
    grew = false;
    for (const c of codes) if (c.parentId !== null && out.has(c.parentId) && !out.has(c.id)) (out.add(c.id), (grew = true));
  }
  return [...out];
}

export async function studyCases(db: Db, studyId: string): Promise<CaseInfo[]> {
  const [cases, values, links] = await Promise.all([
    db.select().from(projectedCases).where(eq(projectedCases.studyId, studyId)).orderBy(asc(projectedCases.name)),
    db.select().from(projectedCaseValues).where(eq(projectedCaseValues.studyId, studyId)),
    db.select().from(projectedCaseTexts).where(eq(projectedCaseTexts.studyId, studyId)),
  ]);
  return cases.map((c) => ({
    id: c.id,
    name: c.name,
    textIds: links.filter((l) => l.caseId === c.id).map((l) => l.textId),
    values: Object.fromEntries(values.filter((v) => v.caseId === c.id).map((v) => [v.attributeId, v.value])),
  }));
}

export interface FactFilter {
  codeIds?: string[];
  coderIds?: string[];
  textIds?: string[];
  speaker?: string;
  /** A round's number: a round layer's own round, or (outside rounds) the round the segment recorded. */
  round?: number;
}

export interface Fact extends SegmentFact {
  layerDocId: string;
  createdAt: Date;
  speaker: string | null;
  round: number | null;
}

/** Segments (not orphaned) of readable layers matching the filter; no quotes (see pageRows). */
export async function segmentFacts(db: Db, studyId: string, layers: readonly LayerInfo[], f: FactFilter): Promise<Fact[]> {
  if (layers.length === 0) return [];
  const conds = [eq(projectedSegments.studyId, studyId), inArray(projectedSegments.layerDocId, layers.map((l) => l.id)), eq(projectedSegments.orphaned, false)];
  if (f.codeIds) conds.push(inArray(projectedSegments.codeId, f.codeIds.length ? f.codeIds : ['\u0000']));
  if (f.coderIds) conds.push(inArray(projectedSegments.coderId, f.coderIds.length ? f.coderIds : ['00000000-0000-0000-0000-000000000000']));
  if (f.textIds) conds.push(inArray(projectedSegments.textId, f.textIds.length ? f.textIds : ['00000000-0000-0000-0000-000000000000']));
  if (f.speaker !== undefined) conds.push(eq(projectedSegments.speaker, f.speaker));
  const inRound = new Map(layers.filter((l) => l.round).map((l) => [l.id, l.round!.number]));
  const rows = await db
    .select({
      id: projectedSegments.id,
      layerDocId: projectedSegments.layerDocId,
      textId: projectedSegments.textId,
      codeId: projectedSegments.codeId,
      coderId: projectedSegments.coderId,
      start: projectedSegments.start,
      end: projectedSegments.end,
      turnIndex: projectedSegments.turnIndex,
      createdAt: projectedSegments.createdAt,
      speaker: projectedSegments.speaker,
      round: projectedSegments.round,
    })
    .from(projectedSegments)
    .where(and(...conds));
  // A round layer's segments are of its round, whatever a client recorded.
  const facts = rows.map((r) => (inRound.has(r.layerDocId) ? { ...r, round: inRound.get(r.layerDocId)! } : r));
  return f.round === undefined ? facts : facts.filter((r) => r.round === f.round);
}

/** Full rows (with quotes), text titles and coder names for one page of facts. */
export async function pageRows(db: Db, page: Fact[]) {
  if (page.length === 0) return { rows: [], titles: new Map<string, string>(), names: new Map<string, string>() };
  const rows = await db
    .select()
    .from(projectedSegments)
    .where(and(inArray(projectedSegments.layerDocId, [...new Set(page.map((p) => p.layerDocId))]), inArray(projectedSegments.id, [...new Set(page.map((p) => p.id))])));
  const want = new Set(page.map((p) => `${p.layerDocId}/${p.id}`));
  const byKey = new Map(rows.filter((r) => want.has(`${r.layerDocId}/${r.id}`)).map((r) => [`${r.layerDocId}/${r.id}`, r]));
  const textIds = [...new Set(page.map((p) => p.textId))];
  const coderIds = [...new Set(page.map((p) => p.coderId).filter((x): x is string => Boolean(x)))];
  const [t, u] = await Promise.all([
    db.select({ id: texts.id, title: texts.title }).from(texts).where(inArray(texts.id, textIds)),
    coderIds.length ? db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, coderIds)) : Promise.resolve([]),
  ]);
  return {
    rows: page.map((p) => byKey.get(`${p.layerDocId}/${p.id}`)!).filter(Boolean),
    titles: new Map(t.map((x) => [x.id, x.title])),
    names: new Map(u.map((x) => [x.id, x.name])),
  };
}

/** Texts in the order they were added (for sorting by text). */
export async function textOrder(db: Db, studyId: string): Promise<Map<string, number>> {
  const rows = await db.select({ id: texts.id }).from(texts).where(eq(texts.studyId, studyId)).orderBy(asc(texts.createdAt), asc(texts.id));
  return new Map(rows.map((r, i) => [r.id, i]));
}
