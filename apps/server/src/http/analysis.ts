/**
 * Analysis over the study, for every member (segments of the layers they may read):
 *   GET /api/studies/:studyId/retrieval — segments with filters, sorted and paged on the server, each in
 *       its context (the turn around it) and linked to its place (textId, start, end).
 *   GET /api/studies/:studyId/tables?kind=frequency|cooccurrence|code-by-attribute|case-by-code
 * Both read the relational projection (about a second behind the documents). Retrieval filters:
 * code (+descendants), coder, source (coders or consensus), round, text, speaker, case, attribute+value,
 * and with+mode (the segments of `code` that co-occur with `with`: the words behind a co-occurrence cell).
 * A round's consensus layer is readable (and so counted) once the round is revealed or closed; its
 * segments have no coder and answer `kind: consensus`.
 */
import { documents, projectedAttributes, texts, users } from '@gloss/db';
import { and, asc, eq, inArray } from 'drizzle-orm';
import { Hono } from 'hono';
import { z } from 'zod';
import { HttpError } from '../errors.js';
import { can } from '../access/policy.js';
import { studySupervision } from '../access/supervision.js';
import type { Role } from '../sync/contracts.js';
import { contexts } from '../analysis/context.js';
import { chooseLayers, pageRows, readableLayers, type LayerInfo, segmentFacts, studyCases, studyCodes, textOrder, withDescendants, type Fact, type FactFilter } from '../analysis/facts.js';
import { caseByCode, codeByAttribute, cooccurrence, cooccurringSegments } from '../analysis/tables.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { requireStore } from './segments.js';
import { studyRole } from './study-access.js';

const list = z
  .string()
  .optional()
  .transform((s) => (s === undefined || s.trim() === '' ? undefined : [...new Set(s.split(',').map((x) => x.trim()).filter(Boolean))]));
const source = z
  .enum(['all', 'coders', 'consensus'])
  .default('all')
  .describe("whose segments: every readable layer (all), coders' layers only, or only rounds' consensus layers (readable once a round is revealed or closed)");
const roundNumber = z.coerce
  .number()
  .int()
  .min(1)
  .optional()
  .describe("a round's number: the layers of that round (its coders' and its consensus), and segments outside rounds that recorded it");
const flag = z.enum(['true', 'false', '1', '0']).optional().transform((v) => v === 'true' || v === '1');

export const RetrievalQuery = z.object({
  code: list.describe('code ids, comma-separated'),
  descendants: flag.describe('include the codes under each code'),
  coder: list.describe('coder user ids'),
  source,
  round: roundNumber,
  text: list.describe('text ids'),
  speaker: z.string().max(200).optional(),
  case: z.string().max(100).optional().describe('only texts of this case'),
  attribute: z.string().max(100).optional(),
  value: z.string().max(500).optional().describe('with attribute: cases whose value (as text) is this; empty = no value'),
  with: z.string().max(100).optional().describe('only segments of `code` that co-occur with this code'),
  mode: z.enum(['overlap', 'unit']).default('overlap'),
  sort: z.enum(['text', 'coded', 'code']).default('text'),
  limit: z.coerce.number().int().min(1).max(500).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});

export const TablesQuery = z.object({
  kind: z.enum(['frequency', 'cooccurrence', 'code-by-attribute', 'case-by-code']),
  mode: z.enum(['overlap', 'unit']).default('overlap'),
  attribute: z.string().max(100).optional(),
  count: z.enum(['cases', 'segments']).default('cases'),
  coder: list.describe('coder user ids'),
  source,
  round: roundNumber,
  text: list.describe('text ids'),
});

function parse<S extends z.ZodType>(schema: S, q: Record<string, string>): z.infer<S> {
  const r = schema.safeParse(q);
  if (!r.success) {
    const i = r.error.issues[0]!;
    throw new HttpError(400, 'bad_request', `${i.path.join('.') || 'query'}: ${i.message}`);
  }
  return r.data;
}

/** Rounds whose layers the caller may read, and whether each has a readable consensus layer. */
function roundFacets(layers: readonly LayerInfo[]) {
  const out = new Map<number, { number: number; name: string; phase: string; consensus: boolean }>();
  for (const l of layers) {
    if (!l.round) continue;
    const r = out.get(l.round.number) ?? { number: l.round.number, name: l.round.name, phase: l.round.phase, consensus: false };
    if (l.kind === 'consensus') r.consensus = true;
    out.set(r.number, r);
  }
  return [...out.values()].sort((a, b) => a.number - b.number);
}

/** What the filters of the screens offer: attributes, cases, coders with readable segments, texts, speakers, rounds. */
async function tableFacets(db: AppDeps['db'], studyId: string, facts: Fact[], cases: Array<{ id: string; name: string }>, layers: readonly LayerInfo[], reader: { role: Role; userId: string }) {
  const coderIds = [...new Set(facts.map((f) => f.coderId).filter((x): x is string => Boolean(x)))];
  const [attrs, textRows, people] = await Promise.all([
    db.select({ id: projectedAttributes.id, name: projectedAttributes.name }).from(projectedAttributes).where(eq(projectedAttributes.studyId, studyId)).orderBy(asc(projectedAttributes.name)),
    db.select({ id: texts.id, title: texts.title }).from(texts).where(eq(texts.studyId, studyId)).orderBy(asc(texts.createdAt), asc(texts.id)),
    coderIds.length ? db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, coderIds)).orderBy(asc(users.name)) : Promise.resolve([]),
  ]);
  // a trainee is offered only the texts assigned to them (issue 9): others' titles are not theirs to see
  const assigned = can(reader.role, 'text.readUnassigned') ? null : (await studySupervision(db, studyId, reader.userId)).assignedTexts;
  return {
    attributes: attrs,
    cases: cases.map((c) => ({ id: c.id, name: c.name })),
    coders: people,
    texts: assigned === null ? textRows : textRows.filter((t) => assigned.has(t.id)),
    speakers: [...new Set(facts.map((f) => f.speaker).filter((x): x is string => Boolean(x)))].sort((a, b) => a.localeCompare(b)),
    rounds: roundFacets(layers),
  };
}

export const FREQUENCY_CAUTION =
  'Counts say how often something was coded, not how much it matters: frequency is not importance. Read the words behind each number.';

export function analysisRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:studyId/retrieval', async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'study.read');
    const me = c.get('session').user.id;
    const q = parse(RetrievalQuery, c.req.query());
    const [readable, codes, cases] = await Promise.all([readableLayers(deps.db, studyId, role, me), studyCodes(deps.db, studyId), studyCases(deps.db, studyId)]);
    const layers = chooseLayers(readable, q);
    const filter: FactFilter = {};
    if (q.code) filter.codeIds = q.descendants ? [...new Set(q.code.flatMap((id) => withDescendants(codes, id)))] : q.code;
    if (q.coder) filter.coderIds = q.coder;
    if (q.speaker !== undefined) filter.speaker = q.speaker;
    if (q.round !== undefined) filter.round = q.round;
    let textIds = q.text;
    const narrow = (ids: string[]) => (textIds = textIds ? textIds.filter((t) => ids.includes(t)) : ids);
    if (q.case !== undefined) narrow(cases.find((k) => k.id === q.case)?.textIds ?? []);
    if (q.attribute !== undefined) {
      const want = q.value ?? '';
      narrow(cases.filter((k) => (k.values[q.attribute!] == null ? '' : String(k.values[q.attribute!])) === want).flatMap((k) => k.textIds));
    }
    if (textIds) filter.textIds = textIds;
    let facts = await segmentFacts(deps.db, studyId, layers, filter);
    if (q.with !== undefined) {
      const partners = await segmentFacts(deps.db, studyId, layers, { ...filter, codeIds: [q.with] });
      const mine = q.code ? facts : [];
      const hits = new Set<string>();
      for (const a of new Set(mine.map((f) => f.codeId))) for (const id of cooccurringSegments([...mine, ...partners], a, q.with, q.mode)) hits.add(id);
      facts = facts.filter((f) => hits.has(f.id));
    }
    const order = await textOrder(deps.db, studyId);
    const label = new Map(codes.map((k) => [k.id, k.label]));
    const layerOf = new Map(readable.map((l) => [l.id, l]));
    const byText = (a: Fact, b: Fact) => (order.get(a.textId) ?? 0) - (order.get(b.textId) ?? 0) || a.start - b.start || a.end - b.end || (a.id < b.id ? -1 : 1);
    facts.sort(
      q.sort === 'coded'
        ? (a, b) => b.createdAt.getTime() - a.createdAt.getTime() || byText(a, b)
        : q.sort === 'code'
          ? (a, b) => (label.get(a.codeId) ?? '').localeCompare(label.get(b.codeId) ?? '') || byText(a, b)
          : byText,
    );
    const page = facts.slice(q.offset, q.offset + q.limit);
    const { rows, titles, names } = await pageRows(deps.db, page);
    const docs = page.length
      ? await deps.db.select({ id: documents.id, textId: documents.textId }).from(documents).where(and(eq(documents.studyId, studyId), eq(documents.kind, 'text')))
      : [];
    const ctx = deps.store
      ? await contexts(requireStore(deps), new Map(docs.map((d) => [d.textId!, d.id])), rows.map((r) => ({ key: `${r.layerDocId}/${r.id}`, textId: r.textId, start: r.start, end: r.end })))
      : new Map();
    return c.json({
      total: facts.length,
      offset: q.offset,
      limit: q.limit,
      items: rows.map((r) => ({
        id: r.id,
        textId: r.textId,
        textTitle: titles.get(r.textId) ?? '',
        coderId: r.coderId,
        coderName: r.coderId ? (names.get(r.coderId) ?? '') : `Consensus, round ${layerOf.get(r.layerDocId)?.round?.number ?? '?'}`,
        kind: layerOf.get(r.layerDocId)?.kind ?? 'coder',
        codeId: r.codeId,
        codeLabel: label.get(r.codeId) ?? r.codeId,
        start: r.start,
        end: r.end,
        quote: r.quote,
        speaker: r.speaker,
        turnIndex: r.turnIndex,
        round: layerOf.get(r.layerDocId)?.round?.number ?? r.round,
        note: r.note,
        createdAt: r.createdAt.toISOString(),
        context: ctx.get(`${r.layerDocId}/${r.id}`) ?? null,
      })),
    });
  });

  app.get('/:studyId/tables', async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'study.read');
    const q = parse(TablesQuery, c.req.query());
    const me = c.get('session').user.id;
    const [readable, codes, cases] = await Promise.all([readableLayers(deps.db, studyId, role, me), studyCodes(deps.db, studyId), studyCases(deps.db, studyId)]);
    const facts = await segmentFacts(deps.db, studyId, chooseLayers(readable, q), {
      ...(q.coder ? { coderIds: q.coder } : {}),
      ...(q.text ? { textIds: q.text } : {}),
      ...(q.round !== undefined ? { round: q.round } : {}),
    });
    const used = new Set(facts.map((f) => f.codeId));
    // codes in use or still current; retired and merged ones only where they were applied
    const shown = codes.filter((k) => used.has(k.id) || k.status === 'active' || k.status === 'draft');
    const codeIds = shown.map((k) => k.id);
    const codeHeads = shown.map((k) => ({ id: k.id, label: k.label, colour: k.colour }));
    const caseHeads = cases.map((k) => ({ id: k.id, label: k.name }));
    const facets = await tableFacets(deps.db, studyId, facts, cases, readable, { role, userId: me });
    switch (q.kind) {
      case 'frequency': {
        const rows = codeIds.map((id) => {
          const mine = facts.filter((f) => f.codeId === id);
          const texts = new Set(mine.map((f) => f.textId));
          return [mine.length, cases.filter((k) => k.textIds.some((t) => texts.has(t))).length, texts.size];
        });
        return c.json({ kind: q.kind, rows: codeHeads, cols: [{ id: 'segments', label: 'Segments' }, { id: 'cases', label: 'Cases' }, { id: 'texts', label: 'Texts' }], cells: rows, caution: FREQUENCY_CAUTION, ...facets });
      }
      case 'cooccurrence': {
        const m = cooccurrence(facts, codeIds, q.mode);
        return c.json({ kind: q.kind, mode: q.mode, rows: codeHeads, cols: codeHeads, cells: m.cells, caution: FREQUENCY_CAUTION, ...facets });
      }
      case 'code-by-attribute': {
        if (!q.attribute) throw new HttpError(400, 'bad_request', 'attribute: name the attribute (its id) to count by.');
        const valueSet = new Set(cases.map((k) => (k.values[q.attribute!] == null ? '' : String(k.values[q.attribute!]))));
        const values = [...valueSet].filter((v) => v !== '').sort((a, b) => a.localeCompare(b));
        if (valueSet.has('')) values.push('');
        const m = codeByAttribute(facts, cases, codeIds, q.attribute, values, q.count);
        return c.json({
          kind: q.kind,
          attribute: q.attribute,
          count: q.count,
          rows: codeHeads,
          cols: values.map((v, i) => ({ id: v, label: v === '' ? 'no value' : v, cases: m.casesPerValue[i] })),
          cells: m.cells,
          caution: FREQUENCY_CAUTION,
          ...facets,
        });
      }
      case 'case-by-code': {
        const m = caseByCode(facts, cases, codeIds);
        return c.json({ kind: q.kind, rows: caseHeads, cols: codeHeads, cells: m.cells, caution: FREQUENCY_CAUTION, ...facets });
      }
    }
  });

  return app;
}
