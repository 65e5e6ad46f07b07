/**
 * Applying accepted replacements across everything of a study: the text documents are edited and the
 * segments that touch a replaced word re-anchored (model `applyEdits`); segment notes in the layers,
 * the codebook (definitions, inclusion and exclusion, example and near-miss quotes, its change log)
 * and the memos, jottings and replies are rewritten string by string (model `replaceInDoc`); each
 * document change is written through the sync layer's DocWriter, so open rooms and other nodes receive
 * it as any edit. Comments on segments and text titles are rows, rewritten in place. The pairs go into
 * the study's pseudonym key; the audit log gets kinds, pseudonyms and counts, never the original words.
 */
import * as Y from 'yjs';
import { auditLog, pseudonyms, rounds, segmentComments, studies, texts, type Db } from '@gloss/db';
import { applyEdits, captureAnchors, planEdits, readText, replaceInDoc, replaceInPlain, replaceInString, restoreAnchors, type Replacement } from '@gloss/model';
import { eq, sql } from 'drizzle-orm';
import { recordAudit } from '../admin/audit.js';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { DocWriter } from '../rounds/doc-change.js';
import { studyAuditDetails, studyComments, studyDetails, studyRounds, studySharedDocs, studyTitles } from './study-docs.js';
import { studyTexts } from './study-texts.js';

export interface AcceptedReplacement extends Replacement {
  kind: string;
}

export interface ApplyResult {
  /** Occurrences replaced in the transcripts. */
  occurrences: number;
  texts: number;
  segmentsMoved: number;
  /** Occurrences replaced outside the transcripts, by place. */
  elsewhere: { codebook: number; memos: number; notes: number; comments: number; titles: number; study: number; rounds: number; audit: number };
}

async function writeDiff(docs: DocWriter, docId: string, doc: Y.Doc, before: Uint8Array, by: string): Promise<void> {
  const diff = Y.encodeStateAsUpdate(doc, before);
  const { structs, ds } = Y.decodeUpdate(diff);
  if (structs.length > 0 || ds.clients.size > 0) await docs.write(docId, diff, by);
}

export async function applyReplacements(
  deps: { db: Db; store: DocLoader; docs: DocWriter },
  studyId: string,
  replacements: readonly AcceptedReplacement[],
  by: string,
): Promise<ApplyResult> {
  let occurrences = 0;
  let changedTexts = 0;
  let segmentsMoved = 0;
  const elsewhere = { codebook: 0, memos: 0, notes: 0, comments: 0, titles: 0, study: 0, rounds: 0, audit: 0 };
  const perOriginal = new Map<string, number>();
  // The codebook and memos hold anchors into the texts (examples, jotting passages): loaded first, so
  // those anchors follow each text's edits as segments do, then rewritten and written once.
  const shared = await Promise.all((await studySharedDocs(deps.db, studyId)).map(async (d) => {
    const doc = await loadDoc(deps.store, d.id);
    return { ...d, doc, before: Y.encodeStateVector(doc) };
  }));
  try {
    for (const t of await studyTexts(deps.db, studyId)) {
      const textDoc = await loadDoc(deps.store, t.docId);
      const layers = await Promise.all(t.layerIds.map((id) => loadDoc(deps.store, id)));
      try {
        const text = readText(textDoc);
        const edits = planEdits(text, replacements);
        for (const e of edits) perOriginal.set(text.slice(e.start, e.end), (perOriginal.get(text.slice(e.start, e.end)) ?? 0) + 1);
        const textBefore = Y.encodeStateVector(textDoc);
        const layersBefore = layers.map((l) => Y.encodeStateVector(l));
        if (edits.length > 0) {
          const captured = shared.map((d) => captureAnchors(d.doc, t.textId, textDoc));
          segmentsMoved += applyEdits(textDoc, layers, edits);
          shared.forEach((d, i) => restoreAnchors(d.doc, t.textId, textDoc, captured[i]!, edits));
          await deps.docs.write(t.docId, Y.encodeStateAsUpdate(textDoc, textBefore), by);
          occurrences += edits.length;
          changedTexts++;
        }
        for (const [i, layer] of layers.entries()) {
          elsewhere.notes += replaceInDoc(layer, replacements);
          await writeDiff(deps.docs, t.layerIds[i]!, layer, layersBefore[i]!, by);
        }
      } finally {
        textDoc.destroy();
        for (const l of layers) l.destroy();
      }
    }
    for (const d of shared) {
      elsewhere[d.kind] += replaceInDoc(d.doc, replacements);
      await writeDiff(deps.docs, d.id, d.doc, d.before, by);
    }
  } finally {
    for (const d of shared) d.doc.destroy();
  }
  for (const c of await studyComments(deps.db, studyId)) {
    const r = replaceInString(c.body, replacements);
    if (r.count === 0) continue;
    await deps.db.update(segmentComments).set({ body: r.text }).where(eq(segmentComments.id, c.id));
    elsewhere.comments += r.count;
  }
  for (const t of await studyTitles(deps.db, studyId)) {
    const r = replaceInString(t.title, replacements);
    if (r.count === 0) continue;
    await deps.db.update(texts).set({ title: r.text }).where(eq(texts.id, t.id));
    elsewhere.titles += r.count;
  }
  const details = await studyDetails(deps.db, studyId);
  if (details) {
    const title = replaceInString(details.title, replacements);
    const description = replaceInString(details.description, replacements);
    const ethicsNote = replaceInString(details.ethicsNote, replacements);
    const n = title.count + description.count + ethicsNote.count;
    if (n > 0) await deps.db.update(studies).set({ title: title.text, description: description.text, ethicsNote: ethicsNote.text }).where(eq(studies.id, studyId));
    elsewhere.study += n;
  }
  for (const r of await studyRounds(deps.db, studyId)) {
    const name = replaceInString(r.name, replacements);
    const purpose = replaceInString(r.purpose, replacements);
    if (name.count + purpose.count === 0) continue;
    await deps.db.update(rounds).set({ name: name.text, purpose: purpose.text }).where(eq(rounds.id, r.id));
    elsewhere.rounds += name.count + purpose.count;
  }
  // Before this call's own entries are written: they carry pseudonyms and counts only.
  for (const entry of await studyAuditDetails(deps.db, studyId, replacements.map((r) => r.original))) {
    const r = replaceInPlain(entry.detail, replacements);
    if (r.count === 0) continue;
    await deps.db.update(auditLog).set({ detail: r.value as Record<string, unknown> }).where(eq(auditLog.id, entry.id));
    elsewhere.audit += r.count;
  }
  for (const r of replacements) {
    await deps.db
      .insert(pseudonyms)
      .values({ studyId, kind: r.kind, original: r.original, pseudonym: r.pseudonym, createdBy: by })
      .onConflictDoUpdate({ target: [pseudonyms.studyId, pseudonyms.original], set: { pseudonym: sql`excluded.pseudonym`, kind: sql`excluded.kind` } });
    await recordAudit(deps.db, {
      userId: by,
      studyId,
      action: 'deid.replace',
      target: studyId,
      detail: { kind: r.kind, pseudonym: r.pseudonym, occurrences: perOriginal.get(r.original) ?? 0 },
    });
  }
  if (Object.values(elsewhere).some((n) => n > 0)) {
    await recordAudit(deps.db, { userId: by, studyId, action: 'deid.replace.elsewhere', target: studyId, detail: { ...elsewhere } });
  }
  return { occurrences, texts: changedTexts, segmentsMoved, elsewhere };
}
