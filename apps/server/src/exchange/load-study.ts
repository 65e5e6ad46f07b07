/**
 * A study's documents read into the plain data that exporters take (@gloss/interchange's StudyFrame
 * and text-by-text segments). Layers are those `canRead` lets through (all for owners and leads today;
 * rounds narrow it later through the role table). Documents are read from the update store, not the
 * projection, so an export has every change committed before it started.
 */
import { type Db, documents, memberships, rounds, studies, texts, users } from '@gloss/db';
import type { ExCode, ExCoder, ExGroup, ExMemo, ExSegment, ExText, StudyFrame, TextWithSegments } from '@gloss/interchange';
import {
  getCodes,
  listAttributes,
  listCases,
  listChanges,
  listExclusiveSets,
  listMemos,
  listReplies,
  listSegments,
  listThemes,
  readText,
  readTurns,
  resolveSegments,
} from '@gloss/model';
import { and, asc, eq, inArray } from 'drizzle-orm';
import * as Y from 'yjs';
import { readableMemosState } from '../access/memo-readers.js';
import type { MemoReaderView } from '../access/memo-view.js';
import { notFound } from '../errors.js';
import { loadDoc, withDocs, type DocLoader } from '../projection/load-doc.js';

export interface LoadOptions {
  /**
   * Which layers may be read (by the layer's document id); default: all. An export made over HTTP passes
   * the caller's rule (rounds included: a participant of an independent round reads no one else's layer
   * of its texts).
   */
  canReadLayer?: (layerDocId: string) => boolean;
  /** Which memos entries may be read (access/memo-view.ts); default: all. An export over HTTP passes the caller's. */
  memoView?: MemoReaderView;
  /**
   * Whose segments: coders' layers outside rounds (default), or the consensus layers of rounds that
   * are revealed or closed (before the reveal a consensus layer is read by nobody). Each consensus
   * layer appears as one coder, "Consensus, round N", and its segments carry round N.
   */
  layers?: 'coders' | 'consensus';
}

/** The pseudo-coder a round's consensus segments are listed under in exports. */
export const consensusCoder = (round: { id: string; number: number }) => ({ id: `consensus:${round.id}`, name: `Consensus, round ${round.number}`, email: '' });

export interface LoadedStudy {
  frame: StudyFrame;
  textList: Array<{ id: string; title: string }>;
  /** Each text with its segments, one at a time (documents are freed after each). */
  texts(): AsyncGenerator<TextWithSegments>;
}

export function codebookFrame(cb: Y.Doc): Pick<StudyFrame, 'codes' | 'groups' | 'attributes' | 'cases'> {
  const codes: ExCode[] = getCodes(cb).map((c) => ({
    id: c.id,
    label: c.label,
    parentId: c.parentId,
    colour: c.colour,
    type: c.type,
    status: c.status,
    briefDefinition: c.briefDefinition,
    fullDefinition: c.fullDefinition,
    inclusion: c.inclusion,
    exclusion: c.exclusion,
    examples: c.examples.map((e) => ({ textId: e.textId, quote: e.quote, ...(e.segmentId ? { segmentId: e.segmentId } : {}) })),
    nearMisses: c.nearMisses.map((e) => ({ textId: e.textId, quote: e.quote, ...(e.segmentId ? { segmentId: e.segmentId } : {}) })),
    mergedInto: c.mergedInto,
    inVivo: c.inVivo,
    createdAt: c.createdAt,
    history: listChanges(cb, c.id).map((h) => ({ at: h.at, by: h.by, kind: h.kind, round: h.round, ...(h.field ? { field: h.field } : {}), ...(h.reason ? { reason: h.reason } : {}), ...(h.detail ? { detail: h.detail } : {}) })),
  }));
  const groups: ExGroup[] = [
    ...listExclusiveSets(cb).map((g) => ({ id: g.id, label: g.label, kind: 'exclusive' as const, codeIds: g.codeIds })),
    ...listThemes(cb).map((g) => ({ id: g.id, label: g.label, kind: 'theme' as const, codeIds: g.codeIds })),
  ];
  return {
    codes,
    groups,
    attributes: listAttributes(cb).map((a) => ({ id: a.id, name: a.name, type: a.type, ...(a.choices ? { choices: a.choices } : {}) })),
    cases: listCases(cb).map((c) => ({ id: c.id, name: c.name, kind: c.kind, values: c.values, textIds: c.textIds })),
  };
}

export function memoList(memos: Y.Doc): ExMemo[] {
  return listMemos(memos).map(({ replyTo: _, ...m }) => ({
    ...m,
    attachedTo: m.attachedTo,
    replies: listReplies(memos, m.id).map((r) => ({ id: r.id, author: r.author, body: r.body, createdAt: r.createdAt })),
  }));
}

export function textData(textId: string, title: string, textDoc: Y.Doc, layers: Array<{ coderId: string; doc: Y.Doc; round?: number }>): TextWithSegments {
  const turns = readTurns(textDoc);
  const text: ExText = { id: textId, title, content: readText(textDoc), turns: turns.map((t) => ({ start: t.start, speaker: t.speaker, startMs: t.startMs, endMs: t.endMs })) };
  const segments: ExSegment[] = [];
  for (const l of layers) {
    const records = listSegments(l.doc);
    const byId = new Map(records.map((r) => [r.id, r]));
    for (const s of resolveSegments(textDoc, records, turns)) {
      if (s.unresolved) continue;
      const r = byId.get(s.id)!;
      segments.push({
        id: s.id,
        textId,
        coderId: l.coderId,
        codeId: s.codeId,
        start: s.start,
        end: s.end,
        quote: s.quote,
        createdAt: s.createdAt,
        ...(r.note !== undefined ? { note: r.note } : {}),
        // a round layer's segments are of its round, whatever a client recorded
        ...(l.round !== undefined ? { round: l.round } : r.round !== undefined ? { round: r.round } : {}),
      });
    }
  }
  return { text, segments };
}

export async function loadStudy(db: Db, store: DocLoader, studyId: string, opts: LoadOptions = {}): Promise<LoadedStudy> {
  const [study] = await db.select().from(studies).where(eq(studies.id, studyId));
  if (!study) throw notFound('Study');
  const docs = await db.select().from(documents).where(eq(documents.studyId, studyId));
  const cbDoc = docs.find((d) => d.kind === 'codebook');
  const memosDoc = docs.find((d) => d.kind === 'memos');
  const cb = cbDoc ? await loadDoc(store, cbDoc.id) : null;
  let memos = memosDoc ? await loadDoc(store, memosDoc.id) : null;
  if (memos && opts.memoView) {
    // the entries the caller may read, as their memos socket would send them
    const readable = new Y.Doc({ gc: false });
    Y.applyUpdate(readable, readableMemosState(Y.encodeStateAsUpdate(memos), opts.memoView));
    memos.destroy();
    memos = readable;
  }
  let frameParts: Pick<StudyFrame, 'codes' | 'groups' | 'attributes' | 'cases'>;
  let memoRows: ExMemo[];
  try {
    frameParts = cb ? codebookFrame(cb) : { codes: [], groups: [], attributes: [], cases: [] };
    memoRows = memos ? memoList(memos) : [];
  } finally {
    cb?.destroy();
    memos?.destroy();
  }
  const canRead = opts.canReadLayer ?? (() => true);
  const studyRounds = await db.select({ id: rounds.id, number: rounds.number, phase: rounds.phase }).from(rounds).where(eq(rounds.studyId, studyId));
  const shown = new Map(studyRounds.filter((r) => r.phase !== 'independent').map((r) => [r.id, r]));
  // Coders: layers outside rounds (a round's layers are calibration material, its report covers them,
  // and a coder's round layer beside their own layer would count them twice on a text).
  const layerDocs =
    opts.layers === 'consensus'
      ? docs.filter((d) => d.kind === 'layer' && d.coderId === null && d.roundId !== null && shown.has(d.roundId) && canRead(d.id))
      : docs.filter((d) => d.kind === 'layer' && d.roundId === null && d.coderId !== null && canRead(d.id));
  const layerCoder = (d: (typeof docs)[number]) => (d.coderId ?? consensusCoder(shown.get(d.roundId!)!).id);
  // everyone who appears: members, coders of readable layers, memo authors
  const members = await db.select({ userId: memberships.userId }).from(memberships).where(eq(memberships.studyId, studyId));
  const ids = new Set([...members.map((m) => m.userId), ...layerDocs.flatMap((d) => (d.coderId ? [d.coderId] : [])), ...memoRows.map((m) => m.author)]);
  const uuidLike = [...ids].filter((id) => /^[0-9a-f-]{36}$/i.test(id));
  const people = uuidLike.length ? await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, uuidLike)) : [];
  const coders: ExCoder[] = people.map((p) => ({ id: p.id, name: p.name, email: p.email })).sort((a, b) => a.name.localeCompare(b.name));
  if (opts.layers === 'consensus') for (const r of [...shown.values()].sort((a, b) => a.number - b.number)) coders.push(consensusCoder(r));
  const textRows = await db.select({ id: texts.id, title: texts.title }).from(texts).where(eq(texts.studyId, studyId)).orderBy(asc(texts.createdAt), asc(texts.id));
  const frame: StudyFrame = { title: study.title, description: study.description, coders, ...frameParts, memos: memoRows };
  return {
    frame,
    textList: textRows,
    async *texts() {
      for (const t of textRows) {
        const textDoc = docs.find((d) => d.kind === 'text' && d.textId === t.id);
        if (!textDoc) continue;
        const layers = layerDocs.filter((d) => d.textId === t.id);
        const data = await withDocs(store, [textDoc.id, ...layers.map((l) => l.id)], ([td, ...ls]) =>
          textData(t.id, t.title, td!, layers.map((l, i) => ({ coderId: layerCoder(l), doc: ls[i]!, ...(l.roundId ? { round: shown.get(l.roundId)!.number } : {}) }))),
        );
        yield data;
      }
    },
  };
}

/** Study ids arrive from scripts too; a row check that also gives the title. */
export async function studyExists(db: Db, studyId: string): Promise<boolean> {
  const [row] = await db.select({ id: studies.id }).from(studies).where(and(eq(studies.id, studyId)));
  return Boolean(row);
}
