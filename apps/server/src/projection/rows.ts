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
import { getCodes, listAttributes, listCases, listMemos, listSegments, readTurns, resolveSegments } from '@gloss/model';
import type * as Y from 'yjs';

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
      id: s.id,
      studyId: info.studyId,
      textId: info.textId,
      coderId: info.coderId,
      codeId: s.codeId,
      start: s.start,
      end: s.end,
      quote: s.quote,
      orphaned: s.orphaned,
      note: byId.get(s.id)?.note ?? null,
      createdAt: new Date(s.createdAt),
    }));
}

export function codeRows(codebook: Y.Doc, studyId: string): ProjectedCodeRow[] {
  return getCodes(codebook).map((c) => ({
    studyId,
    id: c.id,
    label: c.label,
    parentId: c.parentId,
    status: c.status,
    type: c.type,
    briefDefinition: c.briefDefinition,
    fullDefinition: c.fullDefinition,
    inclusion: c.inclusion,
    exclusion: c.exclusion,
    colour: c.colour,
    mergedInto: c.mergedInto,
    inVivo: c.inVivo,
    createdAt: new Date(c.createdAt),
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
    cases: cases.map((c) => ({ studyId, id: c.id, name: c.name, kind: c.kind })),
    attributes: listAttributes(codebook).map((a) => ({ studyId, id: a.id, name: a.name, type: a.type, choices: a.choices ?? null })),
    values: cases.flatMap((c) => Object.entries(c.values).map(([attributeId, value]) => ({ studyId, caseId: c.id, attributeId, value }))),
    texts: cases.flatMap((c) => [...new Set(c.textIds)].map((textId) => ({ studyId, caseId: c.id, textId }))),
  };
}

export function memoRows(memos: Y.Doc, studyId: string): ProjectedMemoRow[] {
  return listMemos(memos).map((m) => {
    const a = m.attachedTo;
    return {
      studyId,
      id: m.id,
      author: m.author,
      kind: m.kind,
      attachedKind: a.kind,
      attachedRef: (a.kind === 'study' ? null : a.kind === 'code' ? a.codeId : a.textId) ?? null,
      segmentId: (a.kind === 'segment' ? a.segmentId : null) ?? null,
      title: m.title,
      body: m.body,
      createdAt: new Date(m.createdAt),
      updatedAt: new Date(m.updatedAt),
    };
  });
}
