/**
 * The agreement endpoint against packages/agreement computed directly on the same data. The layers
 * are seeded with known segments; the reliability data each figure should rest on is written out by
 * hand below (presence/absence of each code in each speaker turn; common practice for multi-code
 * data) and handed to the package's functions. Reflexive mode gives no coefficient (DESIGN §5).
 */
import { auditLog, eq, projectedSegments, studies, type Db } from '@gloss/db';
import { addSegment, newLayerDoc } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  agreementReport,
  cohenKappa,
  countsFromData,
  fleissKappa,
  krippendorffAlpha,
  tableFromData,
  type Cell,
  type CodedText,
} from '../../packages/agreement/src/index.js';
import { ensureLayer } from '../../apps/server/src/admin/texts.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { appendUpdate, clientFor, loadStoredDoc, seedCoding, type CodingSeed } from './support.js';
import { npmAlpha, ratingMatrix, turnUnits, type RecomputeText, type ServedSegment } from './recompute.js';

type Who = 'coder' | 'coder2' | 'trainee';
/** [person, text, code, words] — each segment covers the first occurrence of the words. */
type Plan = Array<[Who, 'coding' | 'basic', 'tools' | 'access' | 'time' | 'place', string]>;
const PLAN: Plan = [
  ['coder', 'coding', 'tools', 'lent me a spade'],
  ['coder', 'coding', 'access', 'keys'],
  ['coder', 'coding', 'place', 'allotment'],
  ['coder2', 'coding', 'tools', 'a spade and a plot'],
  ['coder2', 'coding', 'access', 'committee'],
  ['coder2', 'coding', 'time', 'summer'],
  ['trainee', 'coding', 'tools', 'spade'],
  ['trainee', 'coding', 'time', 'summer'],
  ['coder', 'basic', 'tools', 'spade'],
  ['coder2', 'basic', 'tools', 'spade'],
  ['coder2', 'basic', 'place', 'plot'],
];

interface Seeded extends CodingSeed {
  spans: Array<{ who: Who; text: string; code: string; start: number; end: number }>;
  words: { coding: string; basic: string };
}

async function seedAgreement(db: Db): Promise<Seeded> {
  const s = await seedCoding(db);
  const textDocs = { coding: await loadStoredDoc(db, s.codingTextRoom), basic: await loadStoredDoc(db, s.textRoom) };
  const textIds = { coding: s.codingTextId, basic: s.textId };
  const layers = new Map<string, ReturnType<typeof newLayerDoc>>();
  const spans: Seeded['spans'] = [];
  for (const [who, t, code, words] of PLAN) {
    const key = `${who}/${t}`;
    if (!layers.has(key)) layers.set(key, newLayerDoc());
    const start = textDocs[t].getText('text').toString().indexOf(words);
    addSegment(layers.get(key)!, textDocs[t], { codeId: s.codes[code], start, end: start + words.length });
    spans.push({ who, text: textIds[t], code: s.codes[code], start, end: start + words.length });
  }
  for (const [key, layer] of layers) {
    const [who, t] = key.split('/') as [Who, 'coding' | 'basic'];
    const docId = await ensureLayer(db, s.studyId, textIds[t], s.users[who].id);
    await appendUpdate(db, docId, layer);
  }
  return { ...s, spans, words: { coding: textDocs.coding.getText('text').toString(), basic: textDocs.basic.getText('text').toString() } };
}

interface Result {
  value: number | null;
  ci?: [number, number] | null;
  detail?: Record<string, unknown>;
}
interface Report {
  mode: string;
  statistic?: string;
  coders: Array<{ id: string; name: string }>;
  coderRule?: { rule: string };
  textCoders?: Array<{ textId: string; counted: Array<{ id: string }>; leftOut: Array<{ id: string; reason: string; message: string }> }>;
  codes: Array<{ id: string; label: string }>;
  pooled?: Result;
  perCode?: Array<{ codeId: string; result: Result }>;
  perText?: Array<{ textId: string; result: Result }>;
  perCoderPair?: Array<{ coders: [string, string]; result: Result }>;
  coefficients?: null;
  differences?: Array<{ textId: string; quote: string; byCoder: Array<{ coderId: string; codeIds: string[] }> }>;
}

// Presence (1) or absence (0) of each code per speaker turn, worked out by hand from PLAN.
// Coding text turns: 0 "How did you start with the allotment?", 1 "My neighbour lent me a spade…summer.",
// 2 "Then the committee gave us keys to the shed." Basic text turns: 0 "How did you start?", 1 "My neighbour lent me a spade and a plot."
// Code order: tools, access, time, place.
const BY_HAND: Record<Who, { coding: number[][]; basic: number[][] | null }> = {
  coder: { coding: [[0, 1, 0], [0, 0, 1], [0, 0, 0], [1, 0, 0]], basic: [[0, 1], [0, 0], [0, 0], [0, 0]] },
  coder2: { coding: [[0, 1, 0], [0, 0, 1], [0, 1, 0], [0, 0, 0]], basic: [[0, 1], [0, 0], [0, 0], [0, 1]] },
  trainee: { coding: [[0, 1, 0], [0, 0, 0], [0, 1, 0], [0, 0, 0]], basic: null },
};
/** One coder's row: texts in the order given, then codes, then turns; null where the coder has no layer. */
function row(who: Who, texts: Array<'coding' | 'basic'>, codeIdx = [0, 1, 2, 3]): Cell[] {
  return texts.flatMap((t) => {
    const m = BY_HAND[who][t];
    const turns = t === 'coding' ? 3 : 2;
    return codeIdx.flatMap((c) => (m ? m[c]! : new Array<null>(turns).fill(null)));
  });
}

/** The package's input for the same data, built here: speaker turns are the lines (each with its line break). */
function codedText(s: Seeded, which: 'coding' | 'basic', who: Who[]): CodedText {
  const words = s.words[which];
  const textId = which === 'coding' ? s.codingTextId : s.textId;
  const units: Array<{ start: number; end: number }> = [];
  let at = 0;
  for (const line of words.split('\n')) {
    const end = Math.min(words.length, at + line.length + 1);
    units.push({ start: at, end });
    at = end;
  }
  const withLayer = who.filter((w) => BY_HAND[w][which] !== null);
  return {
    textId,
    textLength: words.length,
    units,
    coders: withLayer.map((w) => s.users[w].id),
    segments: s.spans.filter((x) => x.text === textId && withLayer.includes(x.who)).map((x) => ({ coderId: s.users[x.who].id, codeId: x.code, start: x.start, end: x.end })),
  };
}

describe.each(dbKinds())('agreement endpoint on %s', (db) => {
  let server: SpawnedServer<Seeded>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedAgreement });
  }, 120_000);
  afterAll(async () => server?.stop());

  const query = (q: Record<string, string>) => `/api/studies/${server.seeded.studyId}/agreement?${new URLSearchParams(q)}`;
  const codeList = () => ['tools', 'access', 'time', 'place'].map((k) => server.seeded.codes[k as 'tools']).join(',');

  it('Krippendorff alpha by turn matches the package on the hand-built data: pooled, per code, per text, per pair, bootstrap', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const res = await lead.call<Report>(
      'GET',
      query({ texts: `${s.codingTextId},${s.textId}`, coders: `${s.users.coder.id},${s.users.coder2.id}`, codes: codeList(), unit: 'turn', bootstrap: '200', seed: '7' }),
    );
    expect(res.status).toBe(200);
    const both: Array<'coding' | 'basic'> = ['coding', 'basic'];
    const data = [row('coder', both), row('coder2', both)];
    const alpha = krippendorffAlpha(data);
    expect(alpha.value).not.toBeNull();
    expect(res.body.statistic).toBe('krippendorff-alpha');
    expect(res.body.pooled!.value).toBeCloseTo(alpha.value!, 12);
    // The interval: the package's study report on the same texts (bootstrap over texts).
    const direct = agreementReport(
      { texts: [codedText(s, 'coding', ['coder', 'coder2']), codedText(s, 'basic', ['coder', 'coder2'])], codes: codeList().split(','), coders: [s.users.coder.id, s.users.coder2.id] },
      { unit: 'fixed', bootstrap: { replicates: 200, seed: 7, scheme: 'texts' } },
    );
    expect(direct.pooled.alpha).toBeCloseTo(alpha.value!, 12);
    expect(res.body.pooled!.ci).toEqual(direct.pooled.ci);

    const tools = krippendorffAlpha([row('coder', both, [0]), row('coder2', both, [0])]);
    expect(res.body.perCode!.find((p) => p.codeId === s.codes.tools)!.result.value).toBe(tools.value); // 1: both coded the same turns
    const place = krippendorffAlpha([row('coder', both, [3]), row('coder2', both, [3])]);
    expect(res.body.perCode!.find((p) => p.codeId === s.codes.place)!.result.value).toBeCloseTo(place.value!, 12);
    const codingOnly = krippendorffAlpha([row('coder', ['coding']), row('coder2', ['coding'])]);
    expect(res.body.perText!.find((p) => p.textId === s.codingTextId)!.result.value).toBeCloseTo(codingOnly.value!, 12);
    expect(res.body.perCoderPair).toHaveLength(1);
    expect(res.body.perCoderPair![0]!.result.value).toBeCloseTo(alpha.value!, 12);
  }, 60_000);

  it("Cohen's kappa and Fleiss' kappa match the package", async () => {
    const s = server.seeded;
    const observer = await clientFor(server.url, 'observer');
    const two = await observer.call<Report>('GET', query({ texts: s.codingTextId, coders: `${s.users.coder.id},${s.users.coder2.id}`, codes: codeList(), statistic: 'cohen-kappa' }));
    expect(two.status).toBe(200);
    const kappa = cohenKappa(tableFromData([row('coder', ['coding']), row('coder2', ['coding'])]).table);
    expect(two.body.pooled!.value).toBeCloseTo(kappa.value!, 12);

    const three = await observer.call<Report>(
      'GET',
      query({ texts: s.codingTextId, coders: `${s.users.coder.id},${s.users.coder2.id},${s.users.trainee.id}`, codes: codeList(), statistic: 'fleiss-kappa' }),
    );
    expect(three.status).toBe(200);
    const rows = (['coder', 'coder2', 'trainee'] as const).map((w) => row(w, ['coding']));
    const { categories, counts } = countsFromData(rows);
    expect(three.body.pooled!.value).toBeCloseTo(fleissKappa(counts, categories).value!, 12);
    expect(three.body.perCoderPair).toHaveLength(3);
  }, 60_000);

  it('free spans: unitizing alpha matches the package on the same spans', async () => {
    const s = server.seeded;
    const lead = await clientFor(server.url, 'lead');
    const res = await lead.call<Report>('GET', query({ texts: s.codingTextId, coders: `${s.users.coder.id},${s.users.coder2.id}`, codes: codeList(), unit: 'span' }));
    expect(res.status).toBe(200);
    expect(res.body.statistic).toBe('unitizing-alpha');
    const direct = agreementReport(
      { texts: [codedText(s, 'coding', ['coder', 'coder2'])], codes: codeList().split(','), coders: [s.users.coder.id, s.users.coder2.id] },
      { unit: 'character', unitizing: true },
    );
    const tools = direct.perCode.find((c) => c.codeId === s.codes.tools)!.unitizing!;
    expect(tools.value).not.toBeNull();
    expect(res.body.perCode!.find((p) => p.codeId === s.codes.tools)!.result.value).toBeCloseTo(tools.value!, 12);
    // One text: the pooled figure is the package's per-text unitizing alpha over all codes.
    expect(res.body.pooled!.value).toBeCloseTo(direct.perText[0]!.unitizing!.value!, 12);
  }, 60_000);

  it('by default the coders of a text are those who applied a code there, whoever opened it: the report equals the npm krippendorff package on the served segments (three coders on one text, two on the other)', async () => {
    const s = server.seeded;
    // The lead and the owner open both texts (each gets an empty layer); nobody codes anything new.
    for (const who of ['lead', 'owner'] as const) {
      const c = await clientFor(server.url, who);
      for (const t of [s.codingTextId, s.textId]) expect((await c.call('GET', `/api/texts/${t}`)).status).toBe(200);
    }
    const observer = await clientFor(server.url, 'observer');
    const res = await observer.call<Report>('GET', query({ texts: `${s.codingTextId},${s.textId}` }));
    expect(res.status).toBe(200);
    expect(res.body.coderRule!.rule).toBe('applied-codes');
    const three = [s.users.coder.id, s.users.coder2.id, s.users.trainee.id];
    expect(res.body.coders.map((c) => c.id).sort()).toEqual([...three].sort());
    const [coding, basic] = res.body.textCoders!;
    expect(coding!.counted.map((c) => c.id).sort()).toEqual([...three].sort());
    expect(basic!.counted.map((c) => c.id).sort()).toEqual([s.users.coder.id, s.users.coder2.id].sort()); // the trainee never coded it
    for (const t of [coding!, basic!]) {
      expect(t.leftOut.map((l) => [l.id, l.message]).sort()).toEqual(
        [s.users.lead.id, s.users.owner.id].map((id) => [id, 'not counted: no codes applied']).sort(),
      );
    }

    // Recomputed from what the API serves: the segments, and the words' speaker turns (one per line).
    const served = async (textId: string) => (await observer.call<ServedSegment[]>('GET', `/api/texts/${textId}/segments`)).body;
    const texts: RecomputeText[] = [];
    for (const [which, textId] of [['coding', s.codingTextId], ['basic', s.textId]] as const) {
      const segments = await served(textId);
      const { text, units } = turnUnits(s.words[which].split('\n'));
      for (const x of segments) expect(text.slice(x.start, x.end)).toBe(x.quote);
      texts.push({ units, segments, coders: [...new Set(segments.map((x) => x.coderId))] });
    }
    const codes = [...new Set(texts.flatMap((t) => t.segments.map((x) => x.codeId)))];
    const coders = res.body.coders.map((c) => c.id);
    expect(ratingMatrix(texts, coders, codes).flat().filter((v) => v === undefined)).toHaveLength(codes.length * texts[1]!.units.length); // the trainee on the basic text
    expect(res.body.pooled!.value).toBeCloseTo(npmAlpha(texts, coders, codes), 10);
    expect(res.body.perText!.find((p) => p.textId === s.codingTextId)!.result.value).toBeCloseTo(npmAlpha([texts[0]!], coders, codes), 10);
    expect(res.body.perText!.find((p) => p.textId === s.textId)!.result.value).toBeCloseTo(npmAlpha([texts[1]!], coders, codes), 10);
    expect(res.body.perCoderPair).toHaveLength(3);
    for (const p of res.body.perCoderPair!) expect(p.result.value, p.coders.join(' & ')).toBeCloseTo(npmAlpha(texts, p.coders, codes), 10);
    // And the per-code figure of one code, for good measure.
    const tools = res.body.perCode!.find((p) => p.codeId === s.codes.tools)!.result.value;
    expect(tools).toBeCloseTo(npmAlpha(texts, coders, [s.codes.tools]), 10);
  }, 60_000);

  it('refuses coders, trainees and outsiders, and bad parameters', async () => {
    for (const who of ['coder', 'trainee'] as const) {
      const c = await clientFor(server.url, who);
      expect((await c.call('GET', query({}))).status, who).toBe(403);
    }
    const outsider = await clientFor(server.url, 'outsider');
    expect((await outsider.call('GET', query({}))).status).toBe(404);
    const lead = await clientFor(server.url, 'lead');
    expect((await lead.call('GET', query({ unit: 'page' }))).status).toBe(400);
    expect((await lead.call('GET', query({ statistic: 'guess' }))).status).toBe(400);
    expect((await lead.call('GET', query({ texts: 'nope' }))).status).toBe(400);
    expect((await lead.call('GET', query({ texts: '00000000-0000-4000-8000-000000000000' }))).status).toBe(400);
  }, 60_000);

  it('in reflexive mode there is no coefficient: the differing turns side by side; reports are audited; seeded layers were projected', async () => {
    const s = server.seeded;
    await server.restart((d) => d.update(studies).set({ mode: 'reflexive' }).where(eq(studies.id, s.studyId)));
    const lead = await clientFor(server.url, 'lead');
    const res = await lead.call<Report>('GET', query({ texts: `${s.codingTextId},${s.textId}`, coders: `${s.users.coder.id},${s.users.coder2.id}`, codes: codeList() }));
    expect(res.status).toBe(200);
    expect(res.body.mode).toBe('reflexive');
    expect(res.body.coefficients).toBeNull();
    expect(res.body.pooled).toBeUndefined();
    expect(JSON.stringify(res.body)).not.toMatch(/"value":/);
    // By hand: coding text turns 0 (place vs nothing) and 1 (tools vs tools + time); basic text turn 1 (tools vs tools + place).
    expect(res.body.differences!.map((d) => [d.textId, d.quote])).toEqual([
      [s.codingTextId, 'How did you start with the allotment?\n'],
      [s.codingTextId, 'My neighbour lent me a spade and a plot for the summer.\n'],
      [s.textId, 'My neighbour lent me a spade and a plot.'],
    ]);
    expect(res.body.differences![1]!.byCoder).toEqual([
      { coderId: s.users.coder.id, codeIds: [s.codes.tools] },
      { coderId: s.users.coder2.id, codeIds: [s.codes.time, s.codes.tools].sort() },
    ]);

    await server.kill('SIGTERM');
    const audited = await server.withDb((d) => d.select().from(auditLog).where(eq(auditLog.action, 'agreement.view')));
    expect(audited.length).toBeGreaterThanOrEqual(5);
    // The layers were seeded straight into the log, not through sync: the catch-up at start projected them.
    const projected = await server.withDb((d) => d.select().from(projectedSegments).where(eq(projectedSegments.studyId, s.studyId)));
    expect(projected).toHaveLength(PLAN.length);
  }, 90_000);
});
