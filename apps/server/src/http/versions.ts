/**
 * Named versions of a text or codebook document (a Yjs snapshot kept in `versions`):
 * POST /api/documents/:room/versions {name} (owner, lead: whoever may edit that document), GET …/versions,
 * GET …/versions/:versionId — the past state read-only and a comparison with the current one.
 * Readers of the document may list and read its versions. Creation is audited, and so is reading a
 * text version's segments of other coders.
 */
import { type Db, users, versions } from '@gloss/db';
import { getCodes } from '@gloss/model';
import { and, asc, eq } from 'drizzle-orm';
import { Hono, type Context } from 'hono';
import * as Y from 'yjs';
import { findDocument, roleIn } from '../access/membership.js';
import { decideDocument } from '../access/rounds.js';
import { recordAudit } from '../admin/audit.js';
import { HttpError, forbidden, notFound } from '../errors.js';
import { loadDoc, withDocs } from '../projection/load-doc.js';
import { compareCodebook, compareText, pastDoc, readPastText, segmentsThenNow } from '../versions/compare.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { requireStore } from './segments.js';
import { comparedAs, textDocuments } from './text-layers.js';
import { idParam, readJson } from './validate.js';
import { z } from 'zod';

export const NewVersionBody = z.object({ name: z.string().trim().min(1).max(200) });

async function documentFor(deps: AppDeps, c: Context<AppEnv>) {
  const room = idParam(c, 'room', 'Document');
  const doc = await findDocument(deps.db, room);
  if (!doc) throw notFound('Document');
  const me = c.get('session').user.id;
  const role = await roleIn(deps.db, doc.studyId, me);
  if (!role) throw notFound('Document');
  const access = await decideDocument(deps.db, doc, role, me);
  if (!access.read) throw forbidden(access.reason);
  if (doc.kind !== 'text' && doc.kind !== 'codebook') {
    throw new HttpError(400, 'bad_request', 'Versions are kept for text and codebook documents only.');
  }
  return { doc, role, me, access };
}

async function versionRow(db: Db, docId: string, versionId: string) {
  const [row] = await db
    .select({ v: versions, by: users.name })
    .from(versions)
    .leftJoin(users, eq(users.id, versions.createdBy))
    .where(and(eq(versions.docId, docId), eq(versions.id, versionId)));
  if (!row) throw notFound('Version');
  return row;
}

const summary = (v: typeof versions.$inferSelect, byName: string | null) => ({
  id: v.id,
  name: v.name,
  createdAt: v.createdAt.toISOString(),
  createdBy: v.createdBy ? { id: v.createdBy, name: byName ?? '' } : null,
});

export function versionRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.post('/:room/versions', async (c) => {
    const store = requireStore(deps);
    const { doc, me, access } = await documentFor(deps, c);
    if (!access.write) throw forbidden('Only those who may edit this document (owner, lead) may name versions of it.');
    const { name } = await readJson(c, NewVersionBody);
    const y = await loadDoc(store, doc.id);
    let snapshot: Uint8Array;
    try {
      snapshot = Y.encodeSnapshot(Y.snapshot(y));
    } finally {
      y.destroy();
    }
    const row = await deps.db.transaction(async (tx) => {
      const t = tx as unknown as Db;
      const [v] = await t.insert(versions).values({ docId: doc.id, name, snapshot, createdBy: me }).returning();
      await recordAudit(t, { userId: me, studyId: doc.studyId, action: 'version.create', target: doc.id, detail: { versionId: v!.id, name, kind: doc.kind } });
      return v!;
    });
    return c.json(summary(row, c.get('session').user.name), 201);
  });

  app.get('/:room/versions', async (c) => {
    const { doc } = await documentFor(deps, c);
    const rows = await deps.db
      .select({ v: versions, by: users.name })
      .from(versions)
      .leftJoin(users, eq(users.id, versions.createdBy))
      .where(eq(versions.docId, doc.id))
      .orderBy(asc(versions.createdAt), asc(versions.id));
    return c.json(rows.map((r) => summary(r.v, r.by)));
  });

  app.get('/:room/versions/:versionId', async (c) => {
    const store = requireStore(deps);
    const { doc, role, me } = await documentFor(deps, c);
    const versionId = idParam(c, 'versionId', 'Version');
    const { v, by } = await versionRow(deps.db, doc.id, versionId);
    let snap: Y.Snapshot;
    try {
      snap = Y.decodeSnapshot(v.snapshot);
    } catch {
      throw new HttpError(500, 'internal', 'This version is stored damaged and cannot be read.');
    }
    const head = summary(v, by);
    if (doc.kind === 'codebook') {
      return withDocs(store, [doc.id], ([current]) => {
        const past = pastDoc(current!, snap);
        try {
          return c.json({ version: head, kind: 'codebook', then: { codes: getCodes(past).map(plainCode) }, comparison: compareCodebook(past, current!) });
        } finally {
          past.destroy();
        }
      });
    }
    const { layers } = await textDocuments(deps.db, doc.textId!, role, me);
    const others = layers.filter((l) => l.coderId !== me).map((l) => l.coderId ?? 'consensus');
    if (others.length > 0) {
      // The comparison carries other coders' segments: who read whose coding is in the access log
      // (DESIGN §6), as for the segments route and an opened layer room.
      await recordAudit(deps.db, { userId: me, studyId: doc.studyId, action: 'segments.view', target: doc.textId, detail: { coderIds: others, versionId } });
    }
    return withDocs(store, [doc.id, ...layers.map((l) => l.layerDocId)], ([current, ...layerDocs]) => {
      const past = pastDoc(current!, snap);
      try {
        return c.json({
          version: head,
          kind: 'text',
          then: readPastText(past),
          comparison: {
            text: compareText(current!, snap),
            segments: segmentsThenNow(past, current!, layers.map((l, i) => ({ coderId: comparedAs(l), doc: layerDocs[i]! })), v.createdAt.getTime()),
          },
        });
      } finally {
        past.destroy();
      }
    });
  });

  return app;
}

/** Code entries without their anchored example positions (bytes mean nothing to a reader). */
function plainCode(c: ReturnType<typeof getCodes>[number]) {
  const strip = (e: { id: string; textId: string; segmentId?: string; quote: string }) => ({ id: e.id, textId: e.textId, segmentId: e.segmentId ?? null, quote: e.quote });
  return { ...c, examples: c.examples.map(strip), nearMisses: c.nearMisses.map(strip) };
}

