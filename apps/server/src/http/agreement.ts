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
import { type Db, documents, studies, texts, users } from '@gloss/db';
import { effectiveCodeId, getCodes, listSegments, readText, readTurns, resolveSegments } from '@gloss/model';
import { AgreementError } from '@gloss/agreement';
import { and, eq, inArray } from 'drizzle-orm';
import { Hono } from 'hono';
import type * as Y from 'yjs';
import { z } from 'zod';
import { recordAudit } from '../admin/audit.js';
import { agreementReport } from '../agreement/report.js';
import { countedOn, decideCoders } from '../agreement/coders.js';
import { differences } from '../agreement/differences.js';
import { STATISTICS } from '../agreement/statistics.js';
import { UNIT_KINDS, fixedUnits } from '../agreement/units.js';
import type { TextInput } from '../agreement/data.js';
import { isUuid } from '../access/membership.js';
import { HttpError, notFound } from '../errors.js';
import { withDocs } from '../projection/load-doc.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
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

  app.get('/', async (c) => {
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
    // Every layer on these texts is read: who counts is decided from what each layer holds (coders.ts).
    const layerDocs = docs.filter((d) => d.kind === 'layer');
    let coderIds: string[] = [];

    const cbId = await codebookDocId(deps.db, studyId);
    const textDocIds = textRows.map((t) => docs.find((d) => d.kind === 'text' && d.textId === t.id)!.id);
    const ids = [...textDocIds, ...layerDocs.map((d) => d.id), ...(cbId ? [cbId] : [])];
    const reflexive = study.mode === 'reflexive';

    const body = await withDocs(store, ids, async (loaded) => {
      const textYs = loaded.slice(0, textRows.length);
      const layerSegments = loaded.slice(textRows.length, textRows.length + layerDocs.length).map((y) => listSegments(y));
      const decision = decideCoders(
        textRows.map((t) => ({
          textId: t.id,
          layers: layerDocs.flatMap((d, j) => (d.textId === t.id ? [{ coderId: d.coderId!, segments: layerSegments[j]!.length }] : [])),
        })),
        { coders: q.coders },
      );
      coderIds = decision.coders;
      const names = await coderNames(deps.db, [...new Set([...coderIds, ...decision.perText.flatMap((t) => t.leftOut.map((l) => l.coderId))])]);
      if (!q.coders) coderIds.sort((a, b) => (names.get(a) ?? '').localeCompare(names.get(b) ?? '') || (a < b ? -1 : 1));
      const person = (id: string) => ({ id, name: names.get(id) ?? '' });
      const cb: Y.Doc | undefined = cbId ? loaded[loaded.length - 1] : undefined;
      const effective = (codeId: string) => (cb ? effectiveCodeId(cb, codeId) : codeId);
      const unitKind = q.unit === 'span' || q.unit === 'character' ? 'turn' : q.unit;
      const inputs: TextInput[] = textRows.map((t, i) => {
        const textDoc = textYs[i]!;
        const text = readText(textDoc);
        const turns = readTurns(textDoc);
        const counted = countedOn(decision, t.id);
        const segments: TextInput['segments'][number][] = [];
        layerDocs.forEach((d, j) => {
          if (d.textId !== t.id || !counted.includes(d.coderId!)) return;
          for (const s of resolveSegments(textDoc, layerSegments[j]!, turns)) {
            // Collapsed (orphaned) segments cover no text; unresolved ones cannot be placed.
            if (s.unresolved || s.end <= s.start) continue;
            segments.push({ coderId: d.coderId!, codeId: effective(s.codeId), start: s.start, end: s.end });
          }
        });
        const own = coderIds.filter((c) => counted.includes(c));
        // Units: the asked-for fixed units; speaker turns for showing differences at character or span level.
        return { textId: t.id, textLength: text.length, text, units: fixedUnits(unitKind, text, turns), coders: own, segments };
      });
      const codebookCodes = cb ? getCodes(cb) : [];
      const labels = new Map(codebookCodes.map((k) => [k.id, k.label]));
      const codes = q.codes ?? usedCodes(inputs, coderIds, codebookCodes.map((k) => k.id));
      const head = {
        studyId,
        mode: study.mode,
        unit: q.unit,
        coders: coderIds.map(person),
        coderRule: { rule: decision.rule, description: decision.description },
        textCoders: decision.perText.map((pt) => ({
          textId: pt.textId,
          counted: pt.counted.map(person),
          leftOut: pt.leftOut.map((l) => ({ ...person(l.coderId), reason: l.reason, message: l.message })),
        })),
        texts: textRows,
        codes: codes.map((id) => ({ id, label: labels.get(id) ?? '' })),
      };
      if (reflexive) {
        return {
          ...head,
          coefficients: null,
          note: 'This study is run in the reflexive mode: no agreement coefficient is computed. Units coded differently are listed side by side for discussion.',
          differences: differences(inputs, codes, coderIds),
        };
      }
      const report = agreementReport({
        unit: q.unit,
        statistic: q.statistic,
        texts: inputs,
        codes,
        coders: coderIds,
        ...(q.bootstrap > 0 ? { bootstrap: { replicates: q.bootstrap, seed: q.seed } } : {}),
      });
      return {
        ...head,
        method:
          q.unit === 'span'
            ? "Krippendorff's unitizing alpha (1995/2004) over the coders' segments, overlaps within one coder and code merged; texts laid end to end."
            : `Each (text, code, ${q.unit}) is a unit valued 1 when the coder applied the code to it (any shared character), 0 otherwise; a coder not counted on a text (textCoders says who and why) is missing there. Nominal level.`,
        ...report,
      };
    }).catch((err: unknown) => {
      if (err instanceof AgreementError) throw new HttpError(400, 'bad_request', err.message);
      throw err;
    });

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

/** Codes applied by the chosen coders, in codebook order (codes missing from the codebook last). */
function usedCodes(inputs: TextInput[], coders: string[], codebookOrder: string[]): string[] {
  const used = new Set<string>();
  const wanted = new Set(coders);
  for (const t of inputs) for (const s of t.segments) if (wanted.has(s.coderId)) used.add(s.codeId);
  const rank = new Map(codebookOrder.map((id, i) => [id, i]));
  return [...used].sort((a, b) => (rank.get(a) ?? 1e9) - (rank.get(b) ?? 1e9) || (a < b ? -1 : 1));
}

async function coderNames(db: Db, ids: string[]): Promise<Map<string, string>> {
  if (ids.length === 0) return new Map();
  const rows = await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids));
  return new Map(rows.map((r) => [r.id, r.name]));
}
