/**
 * GET /api/texts/:textId/segments — the segments of every layer the caller may see, resolved from the
 * documents' current state (not the projection, which may lag), with the flags the model computes over
 * the text, those layers and the codebook. Shape (outside scripts rely on it):
 * `[{"id","coderId","codeId","start","end","quote","flags":["orphaned",…]}]`, ordered by start. Texts read
 * recently stay loaded and are refreshed from the log (segments/text-cache.ts).
 */
import { createCodebookDoc } from '@gloss/model';
import { Hono } from 'hono';
import { recordAudit } from '../admin/audit.js';
import { HttpError } from '../errors.js';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import { createTextCache, type TextCacheStore } from '../segments/text-cache.js';
import { segmentsWithFlags } from '../segments/with-flags.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { textRole } from './study-access.js';
import { codebookDocId, textDocuments } from './text-layers.js';

export { segmentsWithFlags, type SegmentOut } from '../segments/with-flags.js';

export function requireStore(deps: AppDeps): DocLoader {
  if (!deps.store) throw new HttpError(503, 'internal', 'Document storage is not available on this server.');
  return deps.store;
}

export function segmentRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));
  // Live copies of recently read texts (segments/text-cache.ts) when the store can say what is new.
  const cache = deps.store && 'since' in deps.store ? createTextCache({ store: deps.store as TextCacheStore }) : null;

  app.get('/:textId/segments', async (c) => {
    const started = performance.now();
    const store = requireStore(deps);
    const { text, me, role, supervision } = await textRole(deps, c);
    const textId = text.id;
    // the supervision facts textRole read are the ones textDocuments would read again: passed on
    const [{ textDocId, layers }, cbId] = await Promise.all([textDocuments(deps.db, textId, role, me, supervision), codebookDocId(deps.db, text.studyId)]);
    const ids = [textDocId, ...layers.map((l) => l.layerDocId), ...(cbId ? [cbId] : [])];
    const lookedUp = performance.now();
    const cached = cache ? await cache.segments({ textId, textDocId, codebookId: cbId, layers }) : null;
    const body = cached
      ? cached.body
      : JSON.stringify(
          await withDocs(store, ids, ([textDoc, ...rest]) => {
            const codebook = cbId ? rest.pop()! : createCodebookDoc();
            return segmentsWithFlags(
              textDoc!,
              codebook,
              layers.map((l, i) => ({ ...l, doc: rest[i]! })),
            );
          }),
        );
    const others = layers.filter((l) => l.coderId !== me).map((l) => l.coderId ?? 'consensus');
    if (others.length > 0) {
      // Who read whose coding is part of the access log (DESIGN §6), as when a layer room is opened.
      await recordAudit(deps.db, { userId: me, studyId: text.studyId, action: 'segments.view', target: textId, detail: { coderIds: others } });
    }
    // where the server's time went (Server-Timing, W3C): the bench and a browser's network panel read it
    const ms = (x: number) => x.toFixed(1);
    const timing = [`access;dur=${ms(lookedUp - started)}`];
    if (cached) timing.push(`refresh;dur=${ms(cached.timings.refresh)}`, `compute;dur=${ms(cached.timings.compute)}`, `json;dur=${ms(cached.timings.json)}`);
    timing.push(`total;dur=${ms(performance.now() - started)}`);
    return c.body(body, 200, { 'content-type': 'application/json', 'server-timing': timing.join(', ') });
  });

  return app;
}
