/**
 * De-identification of a study (owner, lead) and its pseudonym key (owner):
 * POST /api/studies/:studyId/deid/candidates, /deid/apply, /deid/purge; GET /deid/scan;
 * GET, POST …/pseudonyms/export, DELETE /api/studies/:studyId/pseudonyms.
 */
import { Hono } from 'hono';
import { z } from 'zod';
import { applyReplacements } from '../deid/apply.js';
import { findCandidates } from '../deid/finder.js';
import { otherWords, readStudyWords } from '../deid/study-words.js';
import { deleteKey, exportKeyOnce, keyMap, readKey } from '../deid/key.js';
import { purgeStudy } from '../deid/purge.js';
import { scanStudy } from '../deid/scan.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { studyRole } from './study-access.js';
import { readJson } from './validate.js';

export const CandidatesBody = z.object({ list: z.array(z.string().trim().min(2).max(200)).max(500).default([]) });
export const ApplyBody = z.object({
  replacements: z
    .array(z.object({ original: z.string().min(2).max(500), pseudonym: z.string().min(1).max(100), kind: z.string().min(1).max(40) }))
    .min(1)
    .max(2000),
});

export function deidRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));
  const need = () => {
    if (!deps.store || !deps.docs) throw new HttpError(503, 'internal', 'De-identification needs the document store.');
    return { store: deps.store, docs: deps.docs };
  };

  app.post('/:studyId/deid/candidates', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.manage');
    const { list } = await readJson(c, CandidatesBody);
    const { store } = need();
    const texts = await readStudyWords(deps.db, store, studyId);
    const candidates = findCandidates([...texts, ...(await otherWords(deps.db, store, studyId))], list, await keyMap(deps.db, studyId));
    return c.json({ texts: texts.map((t) => ({ id: t.id, title: t.title })), candidates });
  });

  app.post('/:studyId/deid/apply', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.manage');
    const { replacements } = await readJson(c, ApplyBody);
    const { store, docs } = need();
    const result = await applyReplacements({ db: deps.db, store, docs }, studyId, replacements, c.get('session').user.id);
    return c.json(result);
  });

  app.post('/:studyId/deid/purge', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.manage');
    const { store } = need();
    const purged = await purgeStudy({ db: deps.db, store, liveAccess: deps.liveAccess, ...(deps.projector ? { projector: deps.projector } : {}) }, studyId, c.get('session').user.id);
    const key = await keyMap(deps.db, studyId);
    const scan = await scanStudy(deps.db, studyId, [...key.keys()]);
    return c.json({ texts: purged.texts, documents: purged.documents, referencesMoved: purged.referencesMoved, scan, keyEntries: key.size });
  });

  app.get('/:studyId/deid/scan', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.manage');
    const key = await keyMap(deps.db, studyId);
    return c.json({ scan: await scanStudy(deps.db, studyId, [...key.keys()]), keyEntries: key.size });
  });

  app.get('/:studyId/pseudonyms', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.key');
    const { entries, exportedAt } = await readKey(deps.db, studyId);
    return c.json({ entries: entries.map((e) => ({ ...e, createdAt: e.createdAt.toISOString() })), exportedAt: exportedAt?.toISOString() ?? null });
  });

  app.post('/:studyId/pseudonyms/export', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.key');
    const csv = await exportKeyOnce(deps.db, studyId, c.get('session').user.id);
    return c.body(csv, 200, { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': 'attachment; filename="pseudonym-key.csv"' });
  });

  app.delete('/:studyId/pseudonyms', async (c) => {
    const { studyId } = await studyRole(deps, c, 'deid.key');
    await deleteKey(deps.db, studyId, c.get('session').user.id);
    return c.body(null, 204);
  });

  return app;
}
