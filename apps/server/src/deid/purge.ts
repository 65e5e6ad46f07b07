/**
 * The purge (DESIGN §8): after replacements, the original words must not survive anywhere Gloss
 * controls. Every document of the study — texts, layers (segment notes), the codebook, the memos — is
 * rebuilt from its current state without deleted content and under a new id (a new room):
 *
 * 1. The old rooms are marked retired (new upgrades to them are told 4410) and their open connections
 *    on every node are closed with 4410 through live access (clients discard their copies and reload).
 * 2. Pending commits here are flushed and the documents loaded; texts are rebuilt first, then the
 *    anchors pointing into them (segments, examples and near-misses, jotting passages) are moved to
 *    the same offsets of the rebuilt texts, and every other document is rebuilt.
 * 3. One transaction records the old documents' client ids on their retired rows (the rebuilt rooms
 *    refuse structs of those clients), saves the rows that point at the old documents (comments,
 *    reference layers), deletes the old documents — their update log, snapshots and named versions go
 *    by cascade, and rounds stop pointing at the codebook version they started with — inserts the rebuilt ones with their state as first log row and restores the saved rows.
 *
 * An append still in flight to an old document cannot land afterwards: the log's insert checks under
 * a lock that its document exists (store/insert-batch.ts), so it either commits before the delete and
 * is deleted with it, or is refused. Edits made to an old copy after step 2 are lost, by design: those
 * clients are told to reload.
 */
import { randomUUID } from 'node:crypto';
import * as Y from 'yjs';
import { documents, inArray, retiredDocuments, rounds, updates, type Db, type DocumentRow } from '@gloss/db';
import { docClients, moveDocAnchors, rebuildDoc, rebuildTextDoc, reanchorLayer, type TextMove } from '@gloss/model';
import { asc, eq } from 'drizzle-orm';
import { recordAudit } from '../admin/audit.js';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { LiveAccess } from '../sync/live-access.js';
import { restoreReferences, saveReferences } from './doc-references.js';

export interface PurgeDeps {
  db: Db;
  store: DocLoader & { flush?: () => Promise<void> };
  liveAccess: LiveAccess;
  projector?: { notify(docId: string): void; settle?(docIds: readonly string[]): Promise<void> };
}

export interface PurgedDocument {
  kind: DocumentRow['kind'];
  /** The text of a text or layer document. */
  textId: string | null;
  oldRoom: string;
  newRoom: string;
}

export interface PurgeResult {
  /** One entry per text (its text document), as before: the rooms a client of the text needs. */
  texts: Array<{ textId: string; oldRoom: string; newRoom: string; layers: number }>;
  documents: PurgedDocument[];
  /** Rows pointing at old documents (comments, reference layers) moved to the rebuilt ones. */
  referencesMoved: number;
}

export async function purgeStudy(deps: PurgeDeps, studyId: string, by: string): Promise<PurgeResult> {
  const rows = await deps.db.select().from(documents).where(eq(documents.studyId, studyId)).orderBy(asc(documents.createdAt));
  const newIdOf = new Map(rows.map((r) => [r.id, randomUUID()]));
  const oldIds = rows.map((r) => r.id);
  if (rows.length === 0) return { texts: [], documents: [], referencesMoved: 0 };

  // 1. retire first, then close: a socket that arrives in between is told 4410 at its upgrade.
  await deps.db
    .insert(retiredDocuments)
    .values(rows.map((r) => ({ id: r.id, studyId, textId: r.textId, kind: r.kind, replacedBy: newIdOf.get(r.id)! })));
  await deps.liveAccess.changed({ roomIds: oldIds });
  await deps.store.flush?.();

  // 2. rebuild: texts, then the anchors into them, then everything else.
  const loaded = new Map<string, Y.Doc>();
  const built = new Map<string, Y.Doc>();
  try {
    for (const r of rows) loaded.set(r.id, await loadDoc(deps.store, r.id));
    const moves = new Map<string, TextMove>();
    for (const r of rows) {
      if (r.kind !== 'text') continue;
      const fresh = rebuildTextDoc(loaded.get(r.id)!);
      built.set(r.id, fresh);
      moves.set(r.textId!, { old: loaded.get(r.id)!, fresh });
    }
    for (const r of rows) {
      if (r.kind === 'text') continue;
      const doc = loaded.get(r.id)!;
      const move = r.textId ? moves.get(r.textId) : undefined;
      if (r.kind === 'layer' && move) reanchorLayer(move.old, move.fresh, doc);
      else moveDocAnchors(doc, moves);
      built.set(r.id, rebuildDoc(doc));
    }

    // 3. one transaction: the old documents and everything of theirs go, the rebuilt ones come in.
    let referencesMoved = 0;
    await deps.db.transaction(async (tx) => {
      const t = tx as unknown as Db;
      const earlier = await t.select({ replacedBy: retiredDocuments.replacedBy, clients: retiredDocuments.clients }).from(retiredDocuments).where(inArray(retiredDocuments.replacedBy, oldIds));
      for (const r of rows) {
        // An old copy may also be older than the last purge: its clients are refused too.
        const clients = new Set(docClients(loaded.get(r.id)!));
        for (const e of earlier) if (e.replacedBy === r.id) for (const c of e.clients) clients.add(c);
        await t.update(retiredDocuments).set({ clients: [...clients] }).where(eq(retiredDocuments.id, r.id));
      }
      const saved = await saveReferences(t, oldIds);
      // Every named version of the study goes with its document (their snapshots name the old
      // histories); a round's pointer to the codebook it started with would point at nothing.
      await t.update(rounds).set({ codebookVersionId: null }).where(eq(rounds.studyId, studyId));
      await t.delete(documents).where(inArray(documents.id, oldIds));
      await t.insert(documents).values(rows.map((r) => ({ ...r, id: newIdOf.get(r.id)! })));
      for (const r of rows) {
        const first = Y.encodeStateAsUpdate(built.get(r.id)!);
        await t.insert(updates).values({ docId: newIdOf.get(r.id)!, data: first, bytes: first.byteLength, userId: by });
      }
      referencesMoved = await restoreReferences(t, saved, newIdOf);
      for (const r of rows) {
        await recordAudit(t, {
          userId: by,
          studyId,
          action: 'deid.purge',
          target: r.textId ?? studyId,
          detail: { kind: r.kind, oldRoom: r.id, newRoom: newIdOf.get(r.id)! },
        });
      }
    });

    // The projection (quotes, codes, memos) follows the rebuilt documents before anyone scans.
    const fresh = [...newIdOf.values()];
    if (deps.projector?.settle) await deps.projector.settle(fresh);
    else for (const id of fresh) deps.projector?.notify(id);

    const docsOut: PurgedDocument[] = rows.map((r) => ({ kind: r.kind, textId: r.textId, oldRoom: r.id, newRoom: newIdOf.get(r.id)! }));
    const texts = rows
      .filter((r) => r.kind === 'text')
      .map((r) => ({ textId: r.textId!, oldRoom: r.id, newRoom: newIdOf.get(r.id)!, layers: rows.filter((l) => l.kind === 'layer' && l.textId === r.textId).length }));
    return { texts, documents: docsOut, referencesMoved };
  } finally {
    for (const d of loaded.values()) d.destroy();
    for (const d of built.values()) d.destroy();
  }
}
