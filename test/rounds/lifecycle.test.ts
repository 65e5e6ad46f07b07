/**
 * A calibration round's life against a real server, once per database kind: start -> independent ->
 * reveal -> consensus -> close -> next round, with every role (owner, lead, a coder taking part, a
 * coder not taking part, a trainee taking part, an observer, an outsider) trying every round action,
 * from one table of expected results. The rules are the project's own (issue 8, DESIGN §2, §5, §6);
 * statuses follow RFC 9110 (403 refused, 404 unknown or not a member, 409 wrong phase) and RFC 6455
 * (101: a WebSocket handshake accepted).
 */
import { addSegment, getCode, listChanges, listSegments, recheckSegment, updateCodeField } from '@gloss/model';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { gcOffClient, until } from '../coding/support.js';
import { upgradeStatus } from '../support/http.js';
import type { Person } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { clientsFor, EVERYONE, type Client, type LayerOut, type RoundOut, type RoundSeed, seedRounds } from './support.js';

type Expect = Partial<Record<Person, number>>;
/** Expected status per person for one action in one phase; everyone unlisted: the row's `others`. */
interface Row {
  action: string;
  expect: Expect;
  others: number;
  run: (who: Person) => Promise<number>;
}

describe.each(dbKinds())('calibration round lifecycle on %s', (kind) => {
  let server: SpawnedServer<RoundSeed>;
  let s: RoundSeed;
  let as: Record<Person, Client>;
  let roundId = '';
  let round: RoundOut;

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed: seedRounds, startTimeoutMs: 240_000 });
    s = server.seeded;
    as = await clientsFor(server.url);
  }, 300_000);
  afterAll(async () => server?.stop());

  const origin = () => server.url;
  const open = (who: Person, room: string) => upgradeStatus(server.url, room, { origin: origin(), cookie: as[who].cookie });
  const status = async (p: Promise<{ status: number }>) => (await p).status;
  const layerOf = (r: RoundOut, coderId: string | null) => r.texts[0]!.layers.find((l) => l.coderId === coderId)!;

  /** Runs each row for every person and compares the whole table at once (a failure shows every cell). */
  async function check(rows: Row[]) {
    const got: Record<string, Expect> = {};
    const want: Record<string, Expect> = {};
    for (const row of rows) {
      got[row.action] = {};
      want[row.action] = {};
      // Refusals first, then who may act, then who finds it done already (409): a state change (reveal,
      // close) must not change what the others meet.
      const rank = (p: Person) => {
        const st = row.expect[p] ?? row.others;
        return st === 409 ? 2 : st < 300 ? 1 : 0;
      };
      const order = [...EVERYONE].sort((a, b) => rank(a) - rank(b));
      for (const who of order) {
        got[row.action]![who] = await row.run(who);
        want[row.action]![who] = row.expect[who] ?? row.others;
      }
    }
    expect(got).toEqual(want);
  }

  it('starting: only owner and lead may; the body is checked; a round gets its layers and the codebook version', async () => {
    const body = { name: 'Round one', textIds: [s.codingTextId], participantIds: [s.users.coder.id, s.users.trainee.id], unit: 'turn', statistic: 'krippendorff-alpha', purpose: 'Check the tools codes.' };
    await check([
      {
        action: 'start with one participant (invalid)',
        expect: { owner: 400, lead: 400, outsider: 404 },
        others: 403,
        run: (who) => status(as[who].call('POST', `/api/studies/${s.studyId}/rounds`, { ...body, participantIds: [s.users.coder.id] })),
      },
    ]);
    // An observer cannot code, so cannot take part; a text of another study is refused.
    expect((await as.lead.call('POST', `/api/studies/${s.studyId}/rounds`, { ...body, participantIds: [s.users.coder.id, s.users.observer.id] })).status).toBe(400);
    const res = await as.lead.call<RoundOut>('POST', `/api/studies/${s.studyId}/rounds`, body);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ phase: 'independent', number: 1 });
    expect(res.body.codebookVersionId).toBeTruthy();
    roundId = res.body.id;
    // The text is taken: a second open round on it is a conflict.
    expect((await as.owner.call('POST', `/api/studies/${s.studyId}/rounds`, body)).status).toBe(409);
    const versions = await as.lead.call<Array<{ id: string; name: string }>>('GET', `/api/documents/${s.codebookRoom}/versions`);
    expect(versions.body.find((v) => v.id === res.body.codebookVersionId)?.name).toMatch(/^Round 1 \(Round one\)/);
    round = (await as.lead.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
  });

  it('independent phase: who may read, mark done, see progress, open which layer room, reveal', async () => {
    const coderRound = (await as.coder.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    // The participant is told of their own round layer only, writable.
    expect(coderRound.texts[0]!.layers.map((l) => [l.coderId, l.kind, l.canWrite])).toEqual([[s.users.coder.id, 'coder', true]]);
    const coderLayer = layerOf(coderRound, s.users.coder.id).room;
    const textLayers = (await as.coder.call<{ layers: LayerOut[]; round: { id: string; participant: boolean } }>('GET', `/api/texts/${s.codingTextId}`)).body;
    expect(textLayers.round).toMatchObject({ id: roundId, participant: true });
    expect(textLayers.layers).toEqual([{ room: coderLayer, coderId: s.users.coder.id, name: 'Rua Taliaferro', mine: true, canWrite: true, round: roundId, kind: 'coder' }]);
    const leadRound = (await as.lead.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    expect(leadRound.texts[0]!.layers).toEqual([]); // the lead sees progress only
    const traineeLayer = (await as.trainee.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body.texts[0]!.layers[0]!.room;
    const consensus = (leadRound.texts[0] as unknown as { consensusRoom: string }).consensusRoom;

    await check([
      { action: 'list rounds', expect: { outsider: 404 }, others: 200, run: (w) => status(as[w].call('GET', `/api/studies/${s.studyId}/rounds`)) },
      { action: 'read round', expect: { outsider: 404 }, others: 200, run: (w) => status(as[w].call('GET', `/api/rounds/${roundId}`)) },
      {
        action: 'progress',
        expect: { owner: 200, lead: 200, coder: 200, trainee: 200, outsider: 404 },
        others: 403,
        run: (w) => status(as[w].call('GET', `/api/rounds/${roundId}/progress`)),
      },
      {
        action: 'mark done',
        expect: { coder: 200, trainee: 200, outsider: 404 },
        others: 403,
        run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/texts/${s.codingTextId}/done`)),
      },
      { action: 'round agreement', expect: { outsider: 404 }, others: 403, run: (w) => status(as[w].call('GET', `/api/rounds/${roundId}/agreement`)) },
      { action: 'round report', expect: { outsider: 404 }, others: 403, run: (w) => status(as[w].call('GET', `/api/rounds/${roundId}/report?format=md`)) },
      { action: 'open the coder’s round layer', expect: { coder: 101 }, others: 403, run: (w) => open(w, coderLayer) },
      { action: 'open the trainee’s round layer', expect: { trainee: 101 }, others: 403, run: (w) => open(w, traineeLayer) },
      // The coder's layer outside the round: its owner, and those not coding the text in the round.
      { action: 'open the coder’s other layer', expect: { owner: 101, lead: 101, coder: 101, coder2: 101, observer: 101 }, others: 403, run: (w) => open(w, s.coderBaseLayer) },
      { action: 'open the consensus layer', expect: {}, others: 403, run: (w) => open(w, consensus) },
      { action: 'close before reveal', expect: { owner: 409, lead: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/close`)) },
    ]);
    // Progress: counts only; a participant sees their own row.
    const board = await as.lead.call<{ rows: Array<{ participantId: string; done: boolean; segments: number; words: number; wordsCoded: number }> }>('GET', `/api/rounds/${roundId}/progress`);
    expect(board.body.rows.map((r) => [r.participantId, r.done, r.segments])).toEqual(
      expect.arrayContaining([
        [s.users.coder.id, true, 0],
        [s.users.trainee.id, true, 0],
      ]),
    );
    expect(Object.keys(board.body.rows[0]!).sort()).toEqual(['doneAt', 'done', 'name', 'participantId', 'segments', 'textId', 'title', 'words', 'wordsRead', 'wordsCoded'].sort());
    // Words read: reported by the participant's browser; the figure only grows and never passes the text's length.
    const read = (who: Person, words: unknown) => as[who].call<{ wordsRead: number }>('PUT', `/api/rounds/${roundId}/texts/${s.codingTextId}/read`, { words });
    expect((await read('coder', 7)).body.wordsRead).toBe(7);
    expect((await read('coder', 3)).body.wordsRead).toBe(7);
    const total = board.body.rows.find((r) => r.participantId === s.users.coder.id)!.words;
    expect((await read('coder', total + 1000)).body.wordsRead).toBe(total);
    expect((await read('coder', -1)).status).toBe(400);
    expect((await read('observer', 3)).status).toBe(403);
    expect((await read('lead', 3)).status).toBe(403);
    const after = await as.lead.call<{ rows: Array<{ participantId: string; wordsRead: number }> }>('GET', `/api/rounds/${roundId}/progress`);
    expect(after.body.rows.map((r) => [r.participantId, r.wordsRead])).toEqual(expect.arrayContaining([[s.users.coder.id, total], [s.users.trainee.id, 0]]));
    const own = await as.coder.call<{ rows: Array<{ participantId: string }> }>('GET', `/api/rounds/${roundId}/progress`);
    expect(own.body.rows.map((r) => r.participantId)).toEqual([s.users.coder.id]);
    expect((await as.coder.call('DELETE', `/api/rounds/${roundId}/texts/${s.codingTextId}/done`)).body).toMatchObject({ done: false });
  });

  it('reveal: owner and lead only; then round layers open to the team, consensus is written by lead and owner, done marks are over', async () => {
    await check([
      { action: 'reveal', expect: { lead: 200, owner: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/reveal`)) },
    ]);
    const leadRound = (await as.lead.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    expect(leadRound.phase).toBe('revealed');
    const layers = leadRound.texts[0]!.layers;
    expect(layers.map((l) => [l.kind, l.coderId, l.canWrite])).toEqual([
      ['consensus', null, true],
      ['coder', s.users.trainee.id, false],
      ['coder', s.users.coder.id, false],
    ].sort((a, b) => (a[0] === b[0] ? 0 : a[0] === 'consensus' ? -1 : 1)) as never);
    const coderLayer = layerOf(leadRound, s.users.coder.id).room;
    const consensus = layerOf(leadRound, null).room;
    await check([
      // A trainee reads others' layers only when a supervisor shares one with them (issue 9), reveal or not.
      { action: 'open the coder’s round layer', expect: { outsider: 403, trainee: 403 }, others: 101, run: (w) => open(w, coderLayer) },
      { action: 'open the consensus layer', expect: { outsider: 403, trainee: 403 }, others: 101, run: (w) => open(w, consensus) },
      { action: 'round agreement', expect: { owner: 200, lead: 200, coder: 200, trainee: 200, observer: 200, outsider: 404 }, others: 403, run: (w) => status(as[w].call('GET', `/api/rounds/${roundId}/agreement`)) },
      { action: 'mark done', expect: { coder: 409, trainee: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/texts/${s.codingTextId}/done`)) },
      { action: 'report reading', expect: { coder: 409, trainee: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('PUT', `/api/rounds/${roundId}/texts/${s.codingTextId}/read`, { words: 1 })) },
    ]);
    // Who may write the consensus layer: the lead's client writes, the coder's write is refused by the room.
    const textForLead = gcOffClient(server.url, as.lead.cookie, s.codingTextRoom);
    const lead = gcOffClient(server.url, as.lead.cookie, consensus);
    try {
      await until(() => textForLead.provider.synced && lead.provider.synced, 'lead synced');
      const words = 'lent me a spade';
      const at = textForLead.doc.getText('text').toString().indexOf(words);
      addSegment(lead.doc, textForLead.doc, { codeId: s.codes.tools, start: at, end: at + words.length, note: 'Agreed on the call.' });
      await until(async () => (await as.observer.call<Array<{ kind: string }>>('GET', `/api/texts/${s.codingTextId}/segments`)).body.some((x) => x.kind === 'consensus'), 'the consensus segment served');
    } finally {
      lead.destroy();
      textForLead.destroy();
    }
  });

  it('a definition edited while the round is revealed carries the round; earlier coding gets stale-definition until re-checked', async () => {
    const cb = gcOffClient(server.url, as.lead.cookie, s.codebookRoom);
    const mine = gcOffClient(server.url, as.coder.cookie, s.coderBaseLayer);
    try {
      await until(() => cb.provider.synced && mine.provider.synced, 'codebook and layer synced');
      // The server stamped the reveal into the codebook's change log.
      await until(() => listChanges(cb.doc).some((c) => c.kind === 'round' && c.round === 1), 'the reveal stamped in the codebook');
      updateCodeField(cb.doc, s.codes.tools, 'briefDefinition', 'Tools lent or given between plot holders.', { by: s.users.lead.id });
      expect(listChanges(cb.doc, s.codes.tools).at(-1)).toMatchObject({ kind: 'edit', round: 1 });
      expect(getCode(cb.doc, s.codes.tools).briefDefinition).toMatch(/or given/);
      const flagsOfMine = async () =>
        (await as.coder.call<Array<{ layer: string; flags: string[] }>>('GET', `/api/texts/${s.codingTextId}/segments`)).body.filter((x) => x.layer === s.coderBaseLayer).flatMap((x) => x.flags);
      await until(async () => (await flagsOfMine()).includes('stale-definition'), 'stale-definition flag');
      // The coder's "re-checked" action: a mark on the segment in their own layer.
      const [seg] = listSegments(mine.doc);
      recheckSegment(mine.doc, seg!.id);
      await until(async () => !(await flagsOfMine()).includes('stale-definition'), 'stale-definition cleared');
    } finally {
      cb.destroy();
      mine.destroy();
    }
  });

  it('the round agreement counts exactly the participants; the report names its sources in md, csv and json', async () => {
    const a = await as.coder.call<{ coders: Array<{ id: string }>; coderRule: { rule: string }; statistic: string; pooled: unknown; round: { id: string } }>('GET', `/api/rounds/${roundId}/agreement`);
    expect(a.status).toBe(200);
    expect(a.body.coderRule.rule).toBe('participants');
    expect(a.body.coders.map((c) => c.id).sort()).toEqual([s.users.coder.id, s.users.trainee.id].sort());
    expect(a.body).toMatchObject({ statistic: 'krippendorff-alpha', round: { id: roundId } });
    expect(a.body.pooled).toBeDefined();
    const md = await as.lead.call<string>('GET', `/api/rounds/${roundId}/report?format=md`);
    expect(md.headers.get('content-type')).toMatch(/text\/markdown/);
    for (const name of ["O'Connor", 'Joffe', '2020', 'MacPhail', '2016', 'Campbell', '2013']) expect(md.body).toContain(name);
    expect(md.body).toMatch(/Double-coded: 1 of 2 texts/);
    expect(md.body).toContain('Agreed on the call.'); // the reason kept on the consensus segment
    const csv = await as.lead.call<string>('GET', `/api/rounds/${roundId}/report?format=csv`);
    expect(csv.headers.get('content-disposition')).toContain('round-1-report.csv');
    expect(csv.body.replace(/^\uFEFF/, '').split('\r\n')[0]).toBe('section,name,value,ci_low,ci_high,band,detail');
    expect(csv.body).toContain('coefficient,pooled,');
    const json = await as.observer.call<{ coefficients: { pooled: unknown; interval: string } | null; codebook: { changes: Array<{ kind: string }> } }>('GET', `/api/rounds/${roundId}/report`);
    expect(json.body.coefficients?.interval).toMatch(/bootstrap/);
    expect(json.body.codebook.changes.map((c) => c.kind)).toEqual(expect.arrayContaining(['round', 'edit']));
    expect((await as.lead.call('GET', `/api/rounds/${roundId}/report?format=pdf`)).status).toBe(400);
  });

  it('close: owner and lead only; then everything of the round is read-only; the next round starts on the same text', async () => {
    await check([
      { action: 'close', expect: { owner: 200, lead: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/close`)) },
      { action: 'reveal a closed round', expect: { owner: 409, lead: 409, outsider: 404 }, others: 403, run: (w) => status(as[w].call('POST', `/api/rounds/${roundId}/reveal`)) },
    ]);
    const closed = (await as.coder.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    expect(closed.phase).toBe('closed');
    expect(closed.texts[0]!.layers.every((l) => !l.canWrite)).toBe(true);
    const owner = (await as.owner.call<RoundOut>('GET', `/api/rounds/${roundId}`)).body;
    expect(layerOf(owner, null).canWrite).toBe(false);
    // Outside a round the text lists no round layers again.
    const text = (await as.coder.call<{ round: unknown; layers: LayerOut[] }>('GET', `/api/texts/${s.codingTextId}`)).body;
    expect(text.round).toBeNull();
    expect(text.layers.every((l) => l.round === null)).toBe(true);
    const next = await as.lead.call<RoundOut>('POST', `/api/studies/${s.studyId}/rounds`, {
      name: 'Round two',
      textIds: [s.codingTextId, s.textId],
      participantIds: [s.users.coder.id, s.users.coder2.id, s.users.lead.id],
      unit: 'sentence',
      statistic: 'cohen-kappa',
    });
    expect(next.status).toBe(201);
    expect(next.body).toMatchObject({ number: 2, phase: 'independent' });
    // The first round's layers are closed to the new round's participants while they code independently.
    const firstCoderLayer = layerOf(owner, s.users.coder.id).room;
    expect(await open('coder2', firstCoderLayer)).toBe(403);
    expect(await open('observer', firstCoderLayer)).toBe(101);
    expect(await open('trainee', firstCoderLayer)).toBe(403); // others' layers only when shared (issue 9)
    const list = (await as.observer.call<RoundOut[]>('GET', `/api/studies/${s.studyId}/rounds`)).body;
    expect(list.map((r) => [r.number, r.phase])).toEqual([
      [1, 'closed'],
      [2, 'independent'],
    ]);
  });

  /**
   * Every GET route of the OpenAPI description, called by the lead with the study's ids (several query
   * variants for the agreement routes): the answers whose text carries a coefficient — a number under a
   * coefficient's key in JSON, or a pooled coefficient row in Markdown or CSV.
   */
  async function answersWithCoefficients(): Promise<string[]> {
    const spec = (await as.lead.call<{ paths: Record<string, { get?: unknown }> }>('GET', '/api/openapi.json')).body;
    const values: Record<string, string[]> = { studyId: [s.studyId], textId: [s.codingTextId, s.textId], roundId: [roundId], room: [s.codebookRoom, s.codingTextRoom], versionId: [round.codebookVersionId ?? ''] };
    const queries: Record<string, string[]> = {
      '/api/studies/{studyId}/agreement': ['', '?bootstrap=50', `?coders=${s.users.coder.id},${s.users.trainee.id}&unit=sentence&statistic=cohen-kappa`],
      '/api/rounds/{roundId}/agreement': ['', '?bootstrap=50'],
      '/api/rounds/{roundId}/report': ['', '?format=md', '?format=csv'],
      '/api/studies/{studyId}/export': ['?format=csv', '?format=codebook-md'],
      '/api/studies/{studyId}/tables': ['?kind=frequency'],
    };
    const coefficient = /"(pooled|alpha|kappa|pi|coefficient|estimate|percentAgreement)"\s*:\s*(-?\d|\{)|\| pooled \||coefficient,pooled/;
    const hits: string[] = [];
    for (const [path, item] of Object.entries(spec.paths)) {
      // the description itself names the coefficients' fields; the token routes need a link's secret
      if (!item.get || path === '/api/openapi.json' || path.includes('{token}') || path.endsWith('/events')) continue;
      let urls = [path];
      for (const p of [...path.matchAll(/\{(\w+)\}/g)].map((m) => m[1]!)) urls = urls.flatMap((u) => (values[p] ?? []).map((v) => u.replace(`{${p}}`, v)));
      for (const u of urls) for (const q of queries[path] ?? ['']) {
        const res = await fetch(`${server.url}${u}${q}`, { headers: { cookie: as.lead.cookie, origin: server.url } });
        if (coefficient.test(await res.text())) hits.push(`${u}${q}`);
      }
    }
    return hits;
  }

  it('reflexive mode: no route serves a coefficient (every GET route scanned; study agreement, round agreement, round report in json, md, csv)', async () => {
    // In the coding-reliability mode the scan finds the coefficients (so it can see one when it is there).
    const before = await answersWithCoefficients();
    expect(before).toEqual(expect.arrayContaining([`/api/studies/${s.studyId}/agreement`, `/api/rounds/${roundId}/agreement`, `/api/rounds/${roundId}/report?format=md`, `/api/rounds/${roundId}/report?format=csv`]));
    expect((await as.owner.call('PATCH', `/api/studies/${s.studyId}`, { mode: 'reflexive' })).status).toBe(200);
    expect(await answersWithCoefficients()).toEqual([]);
    const study = await as.lead.call<Record<string, unknown>>('GET', `/api/studies/${s.studyId}/agreement`);
    const round = await as.lead.call<Record<string, unknown>>('GET', `/api/rounds/${roundId}/agreement`);
    for (const body of [study.body, round.body]) {
      expect(body.coefficients).toBeNull();
      for (const k of ['pooled', 'perCode', 'perText', 'perCoderPair', 'bootstrap', 'statistic']) expect(body, k).not.toHaveProperty(k);
      expect(Array.isArray(body.differences)).toBe(true);
    }
    const json = await as.lead.call<{ coefficients: unknown; reflexiveNote: string }>('GET', `/api/rounds/${roundId}/report`);
    expect(json.body.coefficients).toBeNull();
    expect(json.body.reflexiveNote).toMatch(/reflexive/);
    const md = (await as.lead.call<string>('GET', `/api/rounds/${roundId}/report?format=md`)).body;
    expect(md).not.toMatch(/\| pooled \|/);
    expect(md).not.toMatch(/alpha|kappa/i);
    const csv = (await as.lead.call<string>('GET', `/api/rounds/${roundId}/report?format=csv`)).body;
    expect(csv).not.toContain('coefficient,pooled');
    expect(csv).toContain('coefficient,none (reflexive mode)');
  });
}, 180_000);
