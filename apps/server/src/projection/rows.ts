/**
 * Pure: the projection rows of a document's state. No I/O; the writer puts them in the database.
 */
import type {
  ProjectedCodeRow,
  ProjectedMemoRow,
  ProjectedSegmentRow,
  projectedAttributes,
  projectedCaseTexts,
  projectedCaseValues,
  projectedCases,
} from '@gloss/db';
import { getCodes, listAttributes, listCases, listMemos, listSegments, readTurns, resolveSegments, turnIndexAt } from '@gloss/model';
import type * as Y from 'yjs';

/**
 * Values written by clients reach these rows. PostgreSQL text cannot hold U+0000 and a timestamp
 * cannot be NaN, so both are made storable here rather than failing the whole document.
 */
const str = (v: string): string => (v.includes('\u0000') ? v.replace(/\u0000/g, '\uFFFD') : v);
const strOrNull = (v: string | null | undefined): string | null => (v == null ? null : str(String(v)));
const when = (ms: number): Date => new Date(Number.isFinite(ms) ? ms : 0);

export interface LayerInfo {
  layerDocId: string;
  studyId: string;
  textId: string;
  coderId: string | null;
}

/** One layer's segments resolved against the text's current state. Unresolvable ones are left out. */
export function segmentRows(textDoc: Y.Doc, layerDoc: Y.Doc, info: LayerInfo, turns = readTurns(textDoc)): ProjectedSegmentRow[] {
  const records = listSegments(layerDoc);
  const byId = new Map(records.map((r) => [r.id, r]));
  return resolveSegments(textDoc, records, turns)
    .filter((s) => !s.unresolved)
    .map((s) => ({
      layerDocId: info.layerDocId,
      id: str(s.id),
      studyId: info.studyId,
      textId: info.textId,
      coderId: info.coderId,
      codeId: str(s.codeId),
      start: s.start,
      end: s.end,
      quote: str(s.quote),
      orphaned: s.orphaned,
      note: strOrNull(byId.get(s.id)?.note),
      createdAt: when(s.createdAt),
      turnIndex: s.start >= 0 && turns.length ? Math.max(0, turnIndexAt(turns, s.start)) : null,
      speaker: strOrNull(s.turn?.speaker),
      round: typeof byId.get(s.id)?.round === 'number' && Number.isInteger(byId.get(s.id)!.round) ? byId.get(s.id)!.round! : null,
    }));
}

export function codeRows(codebook: Y.Doc, studyId: string): ProjectedCodeRow[] {
  return getCodes(codebook).map((c) => ({
    studyId,
    id: str(c.id),
    label: str(c.label),
    parentId: strOrNull(c.parentId),
    status: str(String(c.status)),
    type: str(String(c.type)),
    briefDefinition: str(c.briefDefinition),
    fullDefinition: str(c.fullDefinition),
    inclusion: str(c.inclusion),
    exclusion: str(c.exclusion),
    colour: str(c.colour),
    mergedInto: strOrNull(c.mergedInto),
    inVivo: c.inVivo,
    createdAt: when(c.createdAt),
  }));
}

export interface CaseRows {
  cases: Array<typeof projectedCases.$inferInsert>;
  attributes: Array<typeof projectedAttributes.$inferInsert>;
  values: Array<typeof projectedCaseValues.$inferInsert>;
  texts: Array<typeof projectedCaseTexts.$inferInsert>;
}

/** Cases and attributes live in the codebook document (model README, cases.ts). */
export function caseRows(codebook: Y.Doc, studyId: string): CaseRows {
  const cases = listCases(codebook);
  return {
    cases: cases.map((c) => ({ studyId, id: str(c.id), name: str(String(c.name)), kind: str(String(c.kind)) })),
    attributes: listAttributes(codebook).map((a) => ({ studyId, id: str(a.id), name: str(String(a.name)), type: str(String(a.type)), choices: a.choices ?? null })),
    values: cases.flatMap((c) => Object.entries(c.values).map(([attributeId, value]) => ({ studyId, caseId: str(c.id), attributeId: str(attributeId), value: typeof value === 'string' ? str(value) : value }))),
    texts: cases.flatMap((c) => [...new Set(c.textIds)].map((textId) => ({ studyId, caseId: str(c.id), textId: str(String(textId)) }))),
  };
}

export function memoRows(memos: Y.Doc, studyId: string): ProjectedMemoRow[] {
  return listMemos(memos).map((m) => {
    const a = m.attachedTo;
    return {
      studyId,
      id: str(m.id),
      author: str(String(m.author)),
      kind: str(String(m.kind)),
      attachedKind: str(String(a.kind)),
      attachedRef: strOrNull(a.kind === 'study' ? null : a.kind === 'code' ? a.codeId : a.textId),
      segmentId: strOrNull(a.kind === 'segment' ? a.segmentId : null),
      title: str(String(m.title)),
      body: str(String(m.body)),
      createdAt: when(m.createdAt),
      updatedAt: when(m.updatedAt),
    };
  });
}
