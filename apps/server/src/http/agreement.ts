/**
 * GET /api/studies/:studyId/agreement — intercoder agreement over the current state of the layers.
 * Query: texts=<ids> (default all), coders=<user ids> (default: on each text, whoever applied at least
 * one code there; agreement/coders.ts decides, and the answer lists per text who was counted and who
 * was left out and why),
 * unit=turn|paragraph|sentence|character|span (default turn), statistic=krippendorff-alpha|cohen-kappa|
 * scott-pi|fleiss-kappa|percent-agreement (default krippendorff-alpha; span always unitizing alpha),
 * codes=<ids> (default every code applied), bootstrap=<replicates> and seed=<n> (alpha only).
 * Who: owner, lead and observer (`agreement.read`); coders and trainees are refused so the figures
 * cannot steer coding still under way. Every report is audited. A study in reflexive mode gets no
 * coefficient: the units coded differently, side by side (DESIGN §5).
 */
import { documents, memberships, studies, texts } from '@gloss/db';
import { and, eq, inArray } from 'drizzle-orm';
import { Hono } from 'hono';
import { z } from 'zod';
import { recordAudit } from '../admin/audit.js';
import { computeAgreement } from '../agreement/compute.js';
import { STATISTICS } from '../agreement/statistics.js';
import { UNIT_KINDS } from '../agreement/units.js';
import { isUuid } from '../ids.js';
import { HttpError, notFound } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { heavyOf, heavyRoute } from './heavy-route.js';
import { requireStore } from './segments.js';
import { codebookDocId } from './text-layers.js';
import { studyRole } from './study-access.js';

const idList = (what: string) =>
  z
    .string()
    .optional()
    .transform((s, ctx) => {
      if (s === undefined || s.trim() === '') return undefined;
      const ids = [...new Set(s.split(',').map((x) => x.trim()).filter(Boolean))];
      return ids;
    })
    .describe(what);

export const AgreementQuery = z.object({
  texts: idList('text ids, comma-separated'),
  coders: idList('coder user ids, comma-separated; default: on each text, whoever applied at least one code there (an opened, empty layer counts nowhere). A listed person is counted on every text where they have a layer, even with no codes'),
  codes: idList('code ids, comma-separated'),
  unit: z.enum(UNIT_KINDS).default('turn'),
  statistic: z.enum(STATISTICS).default('krippendorff-alpha'),
  bootstrap: z.coerce.number().int().min(0).max(10_000).default(0),
  seed: z.coerce.number().int().min(0).max(0xffffffff).default(1),
});

export function agreementRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/', heavyRoute(deps), async (c) => {
    const store = requireStore(deps);
    const { studyId } = await studyRole(deps, c, 'agreement.read');
    const parsed = AgreementQuery.safeParse(c.req.query());
    if (!parsed.success) {
      const i = parsed.error.issues[0]!;
      throw new HttpError(400, 'bad_request', `${i.path.join('.') || 'query'}: ${i.message}`);
    }
    const q = parsed.data;
    for (const [name, ids] of [['texts', q.texts], ['coders', q.coders]] as const) {
      const bad = ids?.find((id) => !isUuid(id));
      if (bad) throw new HttpError(400, 'bad_request', `${name}: ${bad} is not an id`);
    }
    const [study] = await deps.db.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw notFound('Study');

    const textRows = await deps.db
      .select({ id: texts.id, title: texts.title })
      .from(texts)
      .where(q.texts ? and(eq(texts.studyId, studyId), inArray(texts.id, q.texts)) : eq(texts.studyId, studyId));
    if (q.texts && textRows.length !== q.texts.length) throw new HttpError(400, 'bad_request', 'texts: some of these texts are not in this study.');
    const order = new Map((q.texts ?? []).map((id, i) => [id, i]));
    textRows.sort((a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0) || a.title.localeCompare(b.title));
    const docs = textRows.length
      ? await deps.db.select().from(documents).where(inArray(documents.textId, textRows.map((t) => t.id)))
      : [];
    // Every layer on these texts outside rounds is read: who counts is decided from what each layer
    // holds (coders.ts). A round's layers are compared in that round's own report (GET /api/rounds/:id/agreement).
    const layerDocs = docs.filter((d) => d.kind === 'layer' && d.roundId === null && d.coderId !== null);
    if (q.coders) {
      // Only people of this study (members, or whoever left a layer here): an arbitrary user id must not
      // come back with that person's name.
      const members = await deps.db.select({ userId: memberships.userId }).from(memberships).where(eq(memberships.studyId, studyId));
      const known = new Set([...members.map((m) => m.userId), ...layerDocs.map((d) => d.coderId!)]);
      const stranger = q.coders.find((id) => !known.has(id.toLowerCase()));
      if (stranger) throw new HttpError(400, 'bad_request', `coders: ${stranger} is not a member of this study.`);
    }
    const cbId = await codebookDocId(deps.db, studyId);
    const reflexive = study.mode === 'reflexive';
    const { body, coderIds } = await computeAgreement(deps.db, store, {
      studyId,
      mode: study.mode,
      texts: textRows.map((t) => ({ ...t, textDocId: docs.find((d) => d.kind === 'text' && d.textId === t.id)!.id })),
      layers: layerDocs.map((d) => ({ id: d.id, textId: d.textId!, coderId: d.coderId! })),
      choice: { coders: q.coders },
      codebookDocId: cbId,
      unit: q.unit,
      statistic: q.statistic,
      codes: q.codes,
      bootstrap: q.bootstrap > 0 ? { replicates: q.bootstrap, seed: q.seed } : undefined,
    }, heavyOf(deps));

    await recordAudit(deps.db, {
      userId: c.get('session').user.id,
      studyId,
      action: 'agreement.view',
      target: studyId,
      detail: { texts: textRows.map((t) => t.id), coders: coderIds, unit: q.unit, statistic: q.statistic, reflexive },
    });
    return c.json(body);
  });

  return app;
}
