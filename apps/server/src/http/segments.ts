/**
 * GET /api/texts/:textId/segments — the segments of every layer the caller may see, resolved from the
 * documents' current state (not the projection, which may lag), with the flags the model computes over
 * the text, those layers and the codebook. Shape (outside scripts rely on it):
 * `[{"id","coderId","codeId","start","end","quote","flags":["orphaned",…]}]`, ordered by start.
 */
import { computeFlags, createCodebookDoc, readTurns, resolveSegments, listSegments } from '@gloss/model';
import { Hono } from 'hono';
import type * as Y from 'yjs';
import { recordAudit } from '../admin/audit.js';
import { countedOn, decideCoders, type CoderChoice } from '../agreement/coders.js';
import { HttpError } from '../errors.js';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { textRole } from './study-access.js';
import { codebookDocId, textDocuments, type VisibleLayer } from './text-layers.js';

export interface SegmentOut {
  id: string;
  coderId: string;
  codeId: string;
  start: number;
  end: number;
  quote: string;
  flags: string[];
}

export function requireStore(deps: AppDeps): DocLoader {
  if (!deps.store) throw new HttpError(503, 'internal', 'Document storage is not available on this server.');
  return deps.store;
}

/**
 * Pure: resolved segments of the given layers plus each segment's flag kinds. The flags are computed
 * over the layers of those counted as coders of the text (agreement/coders.ts: by default whoever
 * applied a code; a round passes its participants), the same rule the agreement report uses.
 */
export function segmentsWithFlags(textDoc: Y.Doc, codebook: Y.Doc, layers: Array<VisibleLayer & { doc: Y.Doc }>, choice: CoderChoice = {}): SegmentOut[] {
  const turns = readTurns(textDoc);
  const counted = countedOn(decideCoders([{ textId: '', layers: layers.map((l) => ({ coderId: l.coderId, segments: listSegments(l.doc).length })) }], choice), '');
  const flagged = layers.filter((l) => counted.includes(l.coderId));
  const flags = computeFlags({ textDoc, codebook, layers: flagged.map((l) => ({ layerId: l.layerDocId, coder: l.coderId, doc: l.doc })) });
  const kinds = new Map<string, Set<string>>();
  for (const f of flags) {
    for (const ref of f.segments) {
      const key = `${ref.layerId}/${ref.segmentId}`;
      let set = kinds.get(key);
      if (!set) kinds.set(key, (set = new Set()));
      set.add(f.kind);
    }
  }
  const out: SegmentOut[] = [];
  for (const l of layers) {
    for (const s of resolveSegments(textDoc, listSegments(l.doc), turns)) {
      if (s.unresolved) continue; // names text this server has not stored: nothing true to say about it
      out.push({
        id: s.id,
        coderId: l.coderId,
        codeId: s.codeId,
        start: s.start,
        end: s.end,
        quote: s.quote,
        flags: [...(kinds.get(`${l.layerDocId}/${s.id}`) ?? [])].sort(),
      });
    }
  }
  return out.sort((a, b) => a.start - b.start || a.end - b.end || (a.coderId < b.coderId ? -1 : a.coderId > b.coderId ? 1 : a.id < b.id ? -1 : 1));
}

export function segmentRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:textId/segments', async (c) => {
    const store = requireStore(deps);
    const { text, me, role } = await textRole(deps, c);
    const textId = text.id;
    const { textDocId, layers } = await textDocuments(deps.db, textId, role, me);
    const cbId = await codebookDocId(deps.db, text.studyId);
    const ids = [textDocId, ...layers.map((l) => l.layerDocId), ...(cbId ? [cbId] : [])];
    const result = await withDocs(store, ids, ([textDoc, ...rest]) => {
      const codebook = cbId ? rest.pop()! : createCodebookDoc();
      return segmentsWithFlags(
        textDoc!,
        codebook,
        layers.map((l, i) => ({ ...l, doc: rest[i]! })),
      );
    });
    const others = layers.filter((l) => l.coderId !== me).map((l) => l.coderId);
    if (others.length > 0) {
      // Who read whose coding is part of the access log (DESIGN §6), as when a layer room is opened.
      await recordAudit(deps.db, { userId: me, studyId: text.studyId, action: 'segments.view', target: textId, detail: { coderIds: others } });
    }
    return c.json(result);
  });

  return app;
}
