/**
 * Applying accepted replacements across every text of a study: the text documents are edited and
 * the segments that touch a replaced word re-anchored (model `applyEdits`), each change written
 * through the sync layer's DocWriter so open rooms and other nodes receive it as any edit. The
 * pairs go into the study's pseudonym key; the audit log gets the kind, pseudonym and counts, never
 * the original words.
 */
import * as Y from 'yjs';
import { pseudonyms, type Db } from '@gloss/db';
import { applyEdits, planEdits, readText, type Replacement } from '@gloss/model';
import { sql } from 'drizzle-orm';
import { recordAudit } from '../admin/audit.js';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { DocWriter } from '../rounds/doc-change.js';
import { studyTexts } from './study-texts.js';

export interface AcceptedReplacement extends Replacement {
  kind: string;
}

export interface ApplyResult {
  occurrences: number;
  texts: number;
  segmentsMoved: number;
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
  const perOriginal = new Map<string, number>();
  for (const t of await studyTexts(deps.db, studyId)) {
    const textDoc = await loadDoc(deps.store, t.docId);
    const layers = await Promise.all(t.layerIds.map((id) => loadDoc(deps.store, id)));
    try {
      const text = readText(textDoc);
      const edits = planEdits(text, replacements);
      if (edits.length === 0) continue;
      for (const e of edits) perOriginal.set(text.slice(e.start, e.end), (perOriginal.get(text.slice(e.start, e.end)) ?? 0) + 1);
      const textBefore = Y.encodeStateVector(textDoc);
      const layersBefore = layers.map((l) => Y.encodeStateVector(l));
      segmentsMoved += applyEdits(textDoc, layers, edits);
      await deps.docs.write(t.docId, Y.encodeStateAsUpdate(textDoc, textBefore), by);
      for (const [i, layer] of layers.entries()) {
        const diff = Y.encodeStateAsUpdate(layer, layersBefore[i]);
        if (Y.decodeUpdate(diff).structs.length > 0) await deps.docs.write(t.layerIds[i]!, diff, by);
      }
      occurrences += edits.length;
      changedTexts++;
    } finally {
      textDoc.destroy();
      for (const l of layers) l.destroy();
    }
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
  return { occurrences, texts: changedTexts, segmentsMoved };
}
