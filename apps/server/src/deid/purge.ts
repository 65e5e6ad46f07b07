/**
 * The purge (DESIGN §8): after replacements, the original words must not survive anywhere Gloss
 * controls. Per text: the old room is marked retired first (new upgrades to it are told 4410), its
 * open connections on every node are closed with 4410 (clients discard their copies), pending
 * commits are flushed; then the document is rebuilt from its current state without deleted content,
 * and in one transaction the old document row goes — with it, by cascade, its update log, snapshot
 * and named versions — and the rebuilt one comes in under a new id (a new room). Every layer on the
 * text is then re-anchored to the rebuilt document at the same offsets, through the DocWriter.
 */
import { randomUUID } from 'node:crypto';
import * as Y from 'yjs';
import { documents, retiredDocuments, updates, type Db } from '@gloss/db';
import { rebuildTextDoc, reanchorLayer } from '@gloss/model';
import { eq } from 'drizzle-orm';
import { recordAudit } from '../admin/audit.js';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { DocWriter } from '../rounds/doc-change.js';
import type { LiveAccess } from '../sync/live-access.js';
import { studyTexts } from './study-texts.js';

export interface PurgeDeps {
  db: Db;
  store: DocLoader & { flush?: () => Promise<void> };
  docs: DocWriter;
  liveAccess: LiveAccess;
}

export interface PurgedText {
  textId: string;
  oldRoom: string;
  newRoom: string;
  layers: number;
}

export async function purgeStudy(deps: PurgeDeps, studyId: string, by: string): Promise<PurgedText[]> {
  const out: PurgedText[] = [];
  for (const t of await studyTexts(deps.db, studyId)) out.push(await purgeText(deps, studyId, t.textId, t.docId, t.layerIds, by));
  // The projection (segment quotes) follows the rebuilt documents before anyone scans.
  await deps.store.flush?.();
  return out;
}

async function purgeText(deps: PurgeDeps, studyId: string, textId: string, oldId: string, layerIds: string[], by: string): Promise<PurgedText> {
  const newId = randomUUID();
  await deps.db.insert(retiredDocuments).values({ id: oldId, studyId, textId, replacedBy: newId });
  await deps.liveAccess.changed({ roomIds: [oldId] });
  await deps.store.flush?.();

  const old = await loadDoc(deps.store, oldId);
  const fresh = rebuildTextDoc(old);
  const layers = await Promise.all(layerIds.map((id) => loadDoc(deps.store, id)));
  try {
    const first = Y.encodeStateAsUpdate(fresh);
    await deps.db.transaction(async (tx) => {
      const t = tx as unknown as Db;
      await t.delete(documents).where(eq(documents.id, oldId));
      await t.insert(documents).values({ id: newId, kind: 'text', studyId, textId });
      await t.insert(updates).values({ docId: newId, data: first, bytes: first.byteLength, userId: by });
      await recordAudit(t, { userId: by, studyId, action: 'deid.purge', target: textId, detail: { oldRoom: oldId, newRoom: newId, layers: layerIds.length } });
    });
    for (const [i, layer] of layers.entries()) {
      const before = Y.encodeStateVector(layer);
      reanchorLayer(old, fresh, layer);
      const diff = Y.encodeStateAsUpdate(layer, before);
      if (Y.decodeUpdate(diff).structs.length > 0) await deps.docs.write(layerIds[i]!, diff, by);
    }
  } finally {
    old.destroy();
    fresh.destroy();
    for (const l of layers) l.destroy();
  }
  return { textId, oldRoom: oldId, newRoom: newId, layers: layerIds.length };
}
