/**
 * The exchange routes over HTTP on a real server process: who may export (owner, lead: the role
 * table's `export`) and import, the streamed attachment, a project imported into a new study, a
 * hostile archive refused with a typed 422 and no study created. (The database-level round trip runs
 * on both kinds in round-trip.test.ts; this runs on one.)
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleStudy } from '../../packages/interchange/src/exchange/sample-study.js';
import { projectFile, projectQdpx } from '../../packages/interchange/src/refi/export.js';
import { clientFor, seedCoding, type CodingSeed } from '../coding/support.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';

describe.each(dbKinds().slice(-1))('exchange routes on %s', (db) => {
  let server: SpawnedServer<CodingSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db, seed: seedCoding, startTimeoutMs: 180_000 });
  }, 240_000);
  afterAll(async () => server?.stop());

  const get = async (person: 'owner' | 'lead' | 'coder' | 'observer', path: string) => {
    const c = await clientFor(server.url, person);
    return fetch(`${server.url}${path}`, { headers: { cookie: c.cookie, origin: server.url } });
  };
  const post = async (person: 'owner' | 'lead' | 'coder', path: string, body: Uint8Array) => {
    const c = await clientFor(server.url, person);
    return fetch(`${server.url}${path}`, { method: 'POST', headers: { cookie: c.cookie, origin: server.url, 'content-type': 'application/octet-stream' }, body: body as BodyInit });
  };

  it('owners and leads export (streamed attachment); coders and observers are refused in plain words', async () => {
    const path = `/api/studies/${server.seeded.studyId}/export?format=codebook-csv`;
    const lead = await get('lead', path);
    expect(lead.status).toBe(200);
    expect(lead.headers.get('content-disposition')).toMatch(/attachment; filename=".*-codebook\.csv"/);
    expect(await lead.text()).toContain('Borrowed tools');
    for (const who of ['coder', 'observer'] as const) {
      const r = await get(who, path);
      expect(r.status).toBe(403);
      expect(((await r.json()) as { error: { message: string } }).error.message).toMatch(/role/);
    }
    const bad = await get('owner', `/api/studies/${server.seeded.studyId}/export?format=pdf`);
    expect(bad.status).toBe(400);
    const audit = await (await get('owner', `/api/studies/${server.seeded.studyId}/audit`)).json() as Array<{ action: string; detail: { format?: string } }>;
    expect(audit.some((e) => e.action === 'export' && e.detail.format === 'codebook-csv')).toBe(true);
    const losses = await (await get('coder', '/api/exchange/losses')).json() as { export: { qdpx: string[] } };
    expect(losses.export.qdpx.join(' ')).toMatch(/exclusive/);
  }, 120_000);

  it('imports a project into a new study; refuses a hostile archive (422, typed) and a coder importing (403)', async () => {
    const ok = await post('owner', '/api/studies/import?format=qdpx&title=From%20a%20file', projectQdpx(projectFile(sampleStudy(), 'routes')));
    expect(ok.status).toBe(201);
    const report = (await ok.json()) as { studyId: string; segments: number };
    expect(report.segments).toBe(6);
    const studies = async () => ((await (await get('owner', '/api/studies')).json()) as unknown[]).length;
    const before = await studies();
    const bad = await post('owner', '/api/studies/import?format=qdpx', new TextEncoder().encode('not a zip at all'));
    expect(bad.status).toBe(422);
    expect(await bad.json()).toMatchObject({ error: { code: 'not_zip' } });
    expect(await studies()).toBe(before);
    const coder = await post('coder', `/api/studies/${server.seeded.studyId}/import?format=qdc`, new TextEncoder().encode('<CodeBook/>'));
    expect(coder.status).toBe(403);
  }, 120_000);
});
