/**
 * GET /api/texts/:textId/comparison?layer=<layer room>&reference=<layer room>[&tolerance=<words>] —
 * one layer against a reference layer on the same text, segment by segment (packages/model
 * comparison.ts defines the categories): `{"missed","extra","otherCode","otherBoundary"}`, each entry
 * with start, end (UTF-16 offsets into the current text), quote and code ids, plus counts per code.
 * Who: anyone who may read both layers under the same rule as the layer rooms (so an independent
 * round's hiding holds here too); reading someone else's layer is audited like opening its room.
 */
import { compareLayers, ComparisonInputError, listSegments, readText, readTurns, resolveSegments } from '@gloss/model';
import { Hono } from 'hono';
import { z } from 'zod';
import { recordAudit } from '../admin/audit.js';
import { isUuid } from '../ids.js';
import { HttpError, notFound } from '../errors.js';
import { withDocs } from '../projection/load-doc.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { requireStore } from './segments.js';
import { textRole } from './study-access.js';
import { textDocuments } from './text-layers.js';
import { readQuery } from './validate.js';

export const ComparisonQuery = z.object({
  layer: z.string().describe('the compared layer room (e.g. a trainee layer)'),
  reference: z.string().describe('the reference layer room (a supervisor, another coder, or a consensus layer)'),
  tolerance: z.coerce.number().int().min(0).max(1000).default(0).describe('boundary tolerance in words'),
});

export function comparisonRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:textId/comparison', async (c) => {
    const store = requireStore(deps);
    const q = readQuery(c, ComparisonQuery);
    for (const [name, id] of [['layer', q.layer], ['reference', q.reference]] as const) {
      if (!isUuid(id)) throw new HttpError(400, 'bad_request', `${name}: ${id} is not a layer room id`);
    }
    const { text, me, role } = await textRole(deps, c);
    const { textDocId, layers } = await textDocuments(deps.db, text.id, role, me);
    const find = (room: string) => layers.find((l) => l.layerDocId === room.toLowerCase());
    const layer = find(q.layer);
    const reference = find(q.reference);
    // A layer of another text, or one the caller may not read, is not there for them.
    if (!layer) throw notFound('Layer');
    if (!reference) throw notFound('Reference layer');

    const result = await withDocs(store, [textDocId, layer.layerDocId, reference.layerDocId], ([textDoc, layerDoc, referenceDoc]) => {
      const turns = readTurns(textDoc!);
      const placed = (doc: typeof layerDoc) =>
        resolveSegments(textDoc!, listSegments(doc!), turns)
          .filter((s) => !s.unresolved)
          .map((s) => ({ id: s.id, codeId: s.codeId, start: s.start, end: s.end }));
      return compareLayers(readText(textDoc!), placed(layerDoc), placed(referenceDoc), q.tolerance);
    }).catch((err: unknown) => {
      if (err instanceof ComparisonInputError) throw new HttpError(400, 'bad_request', err.message);
      throw err;
    });

    const others = [layer, reference].filter((l) => l.coderId !== me).map((l) => l.coderId);
    if (others.length > 0) {
      await recordAudit(deps.db, {
        userId: me,
        studyId: text.studyId,
        action: 'comparison.view',
        target: text.id,
        detail: { layer: layer.layerDocId, reference: reference.layerDocId, coderIds: [...new Set(others)] },
      });
    }
    return c.json({
      textId: text.id,
      layer: { room: layer.layerDocId, coderId: layer.coderId },
      reference: { room: reference.layerDocId, coderId: reference.coderId },
      definitions: DEFINITIONS,
      ...result,
    });
  });

  return app;
}

/** The categories in plain words, for people and scripts (common practice; see packages/model comparison.ts). */
export const DEFINITIONS = {
  missed: 'A reference segment that no segment of the layer overlaps at all.',
  extra: 'A layer segment that overlaps no reference segment of its code (and is not already listed under other code).',
  otherCode: 'A reference segment overlapped by layer segments of other codes only.',
  otherBoundary: 'A reference segment whose same-code match in the layer starts or ends more words away than the tolerance.',
  overlap: 'Two segments overlap when they share at least one character.',
  source: 'Common practice in supervised coding review; no published source fixes these categories.',
};
