/**
 * Issue 14 on the demo study: reading a text never makes anyone a coder. The observer reads the pooled
 * Krippendorff's alpha by speaker turn and the coder list; the lead, the owner and the observer then open
 * every text (GET /api/texts/:id, what the coding screen does, which creates the layer of anyone who may
 * code); the same report is unchanged. A trainee who opens a text and codes nothing is listed as not
 * counted, and is counted when named in coders=. The figure with a counted empty layer is checked against
 * the npm `krippendorff` package (0.1.0, an implementation outside this project) over the reliability data
 * rebuilt here from the segments the API serves.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../apps/server/src/demo/seed.js';
import { apiClient, signIn, type ApiClient } from '../support/http.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { demoTurns, npmAlpha, type ServedSegment } from './recompute.js';

type Role = 'owner' | 'lead' | 'coder' | 'trainee' | 'observer';
interface Person {
  id: string;
  name: string;
}
interface Report {
  coders: Person[];
  coderRule: { rule: string; description: string };
  textCoders: Array<{ textId: string; counted: Person[]; leftOut: Array<Person & { reason: string; message: string }> }>;
  pooled: { value: number | null };
  perText: Array<{ textId: string; result: { value: number | null } }>;
  perCoderPair: Array<{ coders: [string, string]; result: { value: number | null } }>;
}
type Seed = Awaited<ReturnType<typeof seedDemo>>;

describe.each(dbKinds())('who counts as a coder, on the demo study on %s', (db) => {
  let server: SpawnedServer<Seed>;
  const as = new Map<string, ApiClient>();
  const client = async (role: Role, n = 0): Promise<ApiClient> => {
    const key = `${role}${n}`;
    if (!as.has(key)) {
      const account = server.seeded.accounts.filter((a) => a.role === role)[n]!;
      as.set(key, apiClient(server.url, await signIn(server.url, account.email, account.password)));
    }
    return as.get(key)!;
  };
  const report = async (q: Record<string, string> = {}) => {
    const observer = await client('observer');
    const res = await observer.call<Report>('GET', `/api/studies/${server.seeded.studyId}/agreement?${new URLSearchParams({ unit: 'turn', statistic: 'krippendorff-alpha', ...q })}`);
    expect(res.status).toBe(200);
    return res.body;
  };
  const textList = async () => {
    const res = await (await client('observer')).call<Array<{ id: string; title: string }>>('GET', `/api/studies/${server.seeded.studyId}/texts`);
    expect(res.status).toBe(200);
    return res.body;
  };
  const textIds = async () => (await textList()).map((t) => t.id);
  const me = async (role: Role) => (await (await client(role)).call<{ id: string }>('GET', '/api/me')).body.id;

  beforeAll(async () => {
    server = await spawnServer({ db, seed: (d) => seedDemo(d) });
  }, 180_000);
  afterAll(async () => server?.stop());

  it('the pooled alpha and the coder list do not change when the lead, the owner and the observer open every text', async () => {
    const before = await report();
    expect(before.coderRule.rule).toBe('applied-codes');
    expect(before.coders).toHaveLength(2); // the demo seeds two coders' layers (demo/README.md)
    expect(before.pooled.value).not.toBeNull();

    const ids = await textIds();
    expect(ids).toHaveLength(4);
    for (const role of ['lead', 'owner', 'observer'] as const) {
      const c = await client(role);
      for (const id of ids) {
        const res = await c.call<{ layers: Array<{ room: string; mine: boolean; canWrite: boolean }> }>('GET', `/api/texts/${id}`);
        expect(res.status).toBe(200);
        // Whoever may code is still told the room of their own layer (scripts rely on it).
        if (role !== 'observer') expect(res.body.layers.find((l) => l.mine)?.canWrite).toBe(true);
      }
    }

    const after = await report();
    expect(after.pooled.value).toBe(before.pooled.value);
    expect(after.coders).toEqual(before.coders);
    expect(after.perText).toEqual(before.perText);
    expect(after.perCoderPair).toEqual(before.perCoderPair);
    const lead = await me('lead');
    for (const t of after.textCoders) {
      expect(t.counted.map((p) => p.id)).not.toContain(lead);
      expect(t.leftOut.find((l) => l.id === lead)).toMatchObject({ reason: 'no-codes', message: 'not counted: no codes applied' });
    }
  }, 180_000);

  it('a trainee who opened a text and coded nothing is "not counted: no codes applied"; named in coders= they are counted, and the figure is the npm package\'s', async () => {
    const trainee = await me('trainee');
    const base = await report();
    // A text both demo coders coded: the trainee opens it and codes nothing.
    const shared = base.textCoders.find((t) => t.counted.length === 2)!;
    const opened = await (await client('trainee')).call('GET', `/api/texts/${shared.textId}`);
    expect(opened.status).toBe(200);

    const plain = await report({ texts: shared.textId });
    expect(plain.textCoders[0]!.leftOut.find((l) => l.id === trainee)).toMatchObject({ reason: 'no-codes', message: 'not counted: no codes applied' });
    expect(plain.coders.map((p) => p.id)).not.toContain(trainee);

    const named = [...base.coders.map((p) => p.id), trainee];
    const asked = await report({ texts: shared.textId, coders: named.join(',') });
    expect(asked.coderRule.rule).toBe('listed');
    expect(asked.textCoders[0]!.counted.map((p) => p.id).sort()).toEqual([...named].sort());
    expect(asked.coders.map((p) => p.id)).toEqual(named);
    expect(asked.perCoderPair).toHaveLength(3);

    // Independent recomputation: presence of each applied code per speaker turn, from the served
    // segments and the text's turns in the demo's own files; the trainee's row is all absent there.
    const segs = await (await client('lead')).call<ServedSegment[]>('GET', `/api/texts/${shared.textId}/segments`);
    expect(segs.status).toBe(200);
    const { text, units } = demoTurns((await textList()).find((t) => t.id === shared.textId)!.title);
    for (const x of segs.body) expect(text.slice(x.start, x.end)).toBe(x.quote); // the offsets are the demo file's words
    const codes = [...new Set(segs.body.filter((x) => named.includes(x.coderId)).map((x) => x.codeId))];
    const theirs = npmAlpha([{ units, segments: segs.body, coders: named }], named, codes);
    expect(asked.pooled.value).toBeCloseTo(theirs, 10);
    const without = npmAlpha([{ units, segments: segs.body, coders: base.coders.map((p) => p.id) }], base.coders.map((p) => p.id), codes);
    expect(plain.pooled.value).toBeCloseTo(without, 10);
    expect(asked.pooled.value).not.toBeCloseTo(plain.pooled.value!, 3); // the empty layer did change the figure
  }, 180_000);
});
