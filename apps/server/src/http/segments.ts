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
import { codebookDocId, comparedAs, textDocuments, type VisibleLayer } from './text-layers.js';

export interface SegmentOut {
  id: string;
  /** null: a segment of a round's consensus layer. */
  coderId: string | null;
  /** The layer's room, its round (null outside rounds) and kind. */
  layer: string;
  round: string | null;
  kind: 'coder' | 'consensus';
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

const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Pure: resolved segments of the given layers plus each segment's flag kinds. The flags are computed
 * over the layers of those counted as coders of the text (agreement/coders.ts: by default whoever
 * applied a code; a round passes its participants), the same rule the agreement report uses. Layers
 * outside rounds, a round's coder layers and a consensus layer are flagged each among their own kind:
 * a coder's round layer and their own layer outside it are not two coders, nor duplicates of each other.
 */
export function segmentsWithFlags(textDoc: Y.Doc, codebook: Y.Doc, layers: Array<VisibleLayer & { doc: Y.Doc }>, choice: CoderChoice = {}): SegmentOut[] {
  const turns = readTurns(textDoc);
  const groups = new Map<string, Array<VisibleLayer & { doc: Y.Doc }>>();
  for (const l of layers) {
    const key = l.coderId === null ? `consensus:${l.layerDocId}` : (l.roundId ?? '');
    groups.set(key, [...(groups.get(key) ?? []), l]);
  }
  const flags = [...groups.entries()].flatMap(([key, group]) => {
    const counted = countedOn(decideCoders([{ textId: '', layers: group.map((l) => ({ coderId: comparedAs(l), segments: listSegments(l.doc).length })) }], key === '' ? choice : {}), '');
    const flagged = group.filter((l) => counted.includes(comparedAs(l)));
    return computeFlags({ textDoc, codebook, layers: flagged.map((l) => ({ layerId: l.layerDocId, coder: comparedAs(l), doc: l.doc })) });
  });
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
        layer: l.layerDocId,
        round: l.roundId ?? null,
        kind: l.coderId === null ? 'consensus' : 'coder',
        codeId: s.codeId,
        start: s.start,
        end: s.end,
        quote: s.quote,
        flags: [...(kinds.get(`${l.layerDocId}/${s.id}`) ?? [])].sort(),
      });
    }
  }
  return out.sort((a, b) => a.start - b.start || a.end - b.end || cmp(a.coderId ?? '', b.coderId ?? '') || cmp(a.layer, b.layer) || cmp(a.id, b.id));
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
    const others = layers.filter((l) => l.coderId !== me).map((l) => l.coderId ?? 'consensus');
    if (others.length > 0) {
      // Who read whose coding is part of the access log (DESIGN §6), as when a layer room is opened.
      await recordAudit(deps.db, { userId: me, studyId: text.studyId, action: 'segments.view', target: textId, detail: { coderIds: others } });
    }
    return c.json(result);
  });

  return app;
}
