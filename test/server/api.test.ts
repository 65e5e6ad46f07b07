/**
 * The HTTP API against a real server process, once per database kind (PGlite; PostgreSQL when
 * DATABASE_URL is set). Sources for the expected behaviour: the Lucia project's session guide (cookie
 * attributes, Origin check on non-GET, sliding expiry), RFC 9110 (status codes, Retry-After), RFC
 * 6455 §4.1–4.2 (a refused WebSocket handshake is an ordinary HTTP response; success is 101), the
 * OpenAPI 3.1.0 specification (document shape), and the project brief for the role rules.
 */
import { auditLog, sessions, sql } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiClient, sessionCookieFrom, signIn, upgradeStatus, type ApiClient } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed, type Person } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import * as S from '../../apps/server/src/http/schemas.js';

describe.each(dbKinds())('HTTP API on %s', (kind) => {
  let server: SpawnedServer<BasicSeed>;
  let seed: BasicSeed;
  const cookies = {} as Record<Person, string>;
  const as = (p: Person): ApiClient => apiClient(server.url, cookies[p]);
  const anon = () => apiClient(server.url);

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed: seedBasic, env: { MAX_BODY_BYTES: '65536', SESSION_DAYS: '30' } });
    seed = server.seeded;
    for (const p of Object.keys(PEOPLE) as Person[]) cookies[p] = await signIn(server.url, PEOPLE[p].email, PASSWORD);
  }, 120_000); // a cold server start (tsx, PGlite) took 10-20 s here under load; spawnServer's own limit is 60 s
  afterAll(async () => {
    await server?.stop();
  });

  it('reports health with the database kind', async () => {
    const res = await anon().call<{ ok: boolean; db: string }>('GET', '/api/health');
    expect(res.status).toBe(200);
    expect(S.Health.parse(res.body)).toEqual({ ok: true, db: kind });
  });

  it('serves an OpenAPI 3.1 description naming every route and whose schemas match real answers', async () => {
    const res = await anon().call<{ openapi: string; paths: Record<string, object>; components: { schemas: Record<string, object> } }>('GET', '/api/openapi.json');
    expect(res.status).toBe(200);
    expect(res.body.openapi).toBe('3.1.0');
    for (const path of ['/api/health', '/api/session', '/api/me', '/api/studies', '/api/studies/{studyId}', '/api/studies/{studyId}/members', '/api/studies/{studyId}/members/{userId}', '/api/studies/{studyId}/texts', '/api/texts/{textId}', '/api/studies/{studyId}/audit', '/api/texts/{textId}/segments', '/api/studies/{studyId}/texts/import', '/api/studies/{studyId}/agreement', '/api/documents/{room}/versions', '/api/documents/{room}/versions/{versionId}']) {
      expect(res.body.paths, path).toHaveProperty([path]);
    }
    // Every $ref resolves.
    const refs = JSON.stringify(res.body).match(/#\/components\/schemas\/\w+/g) ?? [];
    for (const ref of refs) expect(res.body.components.schemas).toHaveProperty([ref.split('/').pop()!]);
    // Real answers fit the described shapes.
    const fits = (schema: { safeParse(v: unknown): { success: boolean; error?: unknown } }, value: unknown) => {
      const r = schema.safeParse(value);
      expect(r.success, JSON.stringify(r.error)).toBe(true);
    };
    fits(S.Me, (await as('coder').call('GET', '/api/me')).body);
    fits(S.Study, (await as('coder').call('GET', `/api/studies/${seed.studyId}`)).body);
    fits(S.TextDetail, (await as('coder').call('GET', `/api/texts/${seed.textId}`)).body);
    fits(S.Member, (await as('coder').call<unknown[]>('GET', `/api/studies/${seed.studyId}/members`)).body[0]);
    for (const s of (await as('coder').call<unknown[]>('GET', '/api/studies')).body) fits(S.StudySummary, s);
  });

  describe('session', () => {
    it('signs in with an HttpOnly, SameSite=Lax cookie (no Secure over plain http) and signs out', async () => {
      const res = await anon().call<{ id: string; email: string }>('POST', '/api/session', { email: '  Rua.Coder@Example.TEST ', password: PASSWORD });
      expect(res.status).toBe(200);
      expect(res.body.id).toBe(seed.users.coder.id);
      const setCookie = res.headers.getSetCookie().join('\n');
      expect(setCookie).toMatch(/gloss_session=[a-z2-7]{32}; HttpOnly; SameSite=Lax; Path=\//);
      expect(setCookie).not.toMatch(/Secure/);
      const cookie = sessionCookieFrom(res.headers)!;
      expect((await apiClient(server.url, cookie).call('GET', '/api/me')).status).toBe(200);
      const out = await apiClient(server.url, cookie).call('DELETE', '/api/session');
      expect(out.status).toBe(204);
      expect(out.headers.getSetCookie().join()).toMatch(/Max-Age=0/);
      const after = await apiClient(server.url, cookie).call<{ error: { code: string } }>('GET', '/api/me');
      expect(after.status).toBe(401);
      expect(after.body.error.code).toBe('unauthenticated');
    });

    it('replaces the browser’s previous session on a new sign-in', async () => {
      const first = await signIn(server.url, PEOPLE.coder2.email, PASSWORD);
      const again = await apiClient(server.url, first).call('POST', '/api/session', { email: PEOPLE.coder2.email, password: PASSWORD });
      expect(again.status).toBe(200);
      const second = sessionCookieFrom(again.headers)!;
      expect(second).not.toBe(first);
      expect((await apiClient(server.url, first).call('GET', '/api/me')).status).toBe(401);
      expect((await apiClient(server.url, second).call('GET', '/api/me')).status).toBe(200);
    });

    it('refuses a wrong password and an unknown email alike (401, same message)', async () => {
      const wrong = await anon().call<{ error: { code: string; message: string } }>('POST', '/api/session', { email: PEOPLE.lead.email, password: 'not-it-at-all' });
      const unknown = await anon().call<{ error: { code: string; message: string } }>('POST', '/api/session', { email: 'nobody@example.test', password: 'not-it-at-all' });
      expect(wrong.status).toBe(401);
      expect(unknown.status).toBe(401);
      expect(wrong.body).toEqual(unknown.body);
      expect(wrong.body.error.code).toBe('invalid_credentials');
    });

    it('rate-limits after 5 failures per email and address: 429 with Retry-After, even for the right password', async () => {
      const email = PEOPLE.trainee.email;
      for (let i = 0; i < 5; i++) expect((await anon().call('POST', '/api/session', { email, password: `wrong-${i}-xxxx` })).status).toBe(401);
      const limited = await anon().call<{ error: { code: string } }>('POST', '/api/session', { email, password: PASSWORD });
      expect(limited.status).toBe(429);
      expect(limited.body.error.code).toBe('rate_limited');
      const retry = Number(limited.headers.get('retry-after'));
      expect(retry).toBeGreaterThan(0);
      expect(retry).toBeLessThanOrEqual(15 * 60);
      // A forged X-Forwarded-For does not make a new address: TRUST_PROXY is off by default.
      expect((await anon().call('POST', '/api/session', { email, password: PASSWORD }, { 'x-forwarded-for': '198.51.100.7' })).status).toBe(429);
      // Another account from the same address is not affected.
      expect((await anon().call('POST', '/api/session', { email: PEOPLE.observer.email, password: PASSWORD })).status).toBe(200);
    });

    it('counts parallel guesses before any is answered: of 12 at once, exactly 5 are tried and 7 refused (429)', async () => {
      // An email without an account: it is limited exactly like one with an account (nothing tells them apart).
      const guesses = await Promise.all(
        Array.from({ length: 12 }, (_, i) => anon().call('POST', '/api/session', { email: 'parallel.guess@example.test', password: `guess-${i}-xxxx` })),
      );
      const statuses = guesses.map((g) => g.status).sort();
      expect(statuses).toEqual([...Array<number>(5).fill(401), ...Array<number>(7).fill(429)]);
    });

    it('refuses cookie-authenticated writes from another origin or with no Origin/Referer (403 bad_origin)', async () => {
      const body = { title: 'Cross-site attempt' };
      const evil = await as('owner').call<{ error: { code: string } }>('POST', '/api/studies', body, { origin: 'http://evil.example' });
      expect(evil.status).toBe(403);
      expect(evil.body.error.code).toBe('bad_origin');
      const res = await fetch(`${server.url}/api/studies`, {
        method: 'POST',
        headers: { cookie: cookies.owner, 'content-type': 'application/json' },
        body: JSON.stringify(body),
      });
      expect(res.status).toBe(403);
      const viaReferer = await as('owner').call('POST', '/api/studies', { title: 'Via referer' }, { origin: '', referer: `${server.url}/studies` });
      expect(viaReferer.status).toBe(201);
      // Reads are not subject to the check.
      expect((await as('owner').call('GET', '/api/studies', undefined, { origin: 'http://evil.example' })).status).toBe(200);
    });
  });

  describe('headers and origins', () => {
    it('puts CSP with frame-ancestors, X-Frame-Options, Referrer-Policy and nosniff on every answer, errors and the web app included', async () => {
      // Header meanings: CSP Level 3 (W3C), RFC 7034 (X-Frame-Options), Referrer Policy (W3C), Fetch standard (nosniff).
      const answers = [
        await anon().call('GET', '/api/health'),
        await anon().call('GET', '/api/me'), // 401
        await anon().call('GET', '/api/no-such-thing'), // 404
        await as('owner').call('POST', '/api/studies', { title: 'x' }, { origin: 'http://evil.example' }), // 403
        await anon().call('GET', '/'), // the web app (or its not-built page)
        await anon().call('GET', '/sync/some-room'), // 426
      ];
      for (const res of answers) {
        const csp = res.headers.get('content-security-policy') ?? '';
        expect(csp, String(res.status)).toContain("frame-ancestors 'none'");
        expect(csp).toContain("default-src 'self'");
        expect(csp).toContain("script-src 'self'");
        expect(csp).not.toMatch(/script-src[^;]*unsafe/);
        expect(res.headers.get('x-frame-options')).toBe('DENY');
        expect(res.headers.get('referrer-policy')).toBe('same-origin');
        expect(res.headers.get('x-content-type-options')).toBe('nosniff');
        expect(res.headers.get('strict-transport-security')).toBeNull(); // plain http: HSTS would mean nothing
      }
    });

    it('compares origins exactly: another scheme or port of the same host is refused (403 bad_origin)', async () => {
      const { port } = new URL(server.url);
      for (const origin of [`https://127.0.0.1:${port}`, `http://127.0.0.1:${Number(port) + 1}`, `http://127.0.0.1:${port}.evil.example`]) {
        const res = await as('owner').call<{ error: { code: string } }>('POST', '/api/studies', { title: 'Cross-origin attempt' }, { origin });
        expect([res.status, res.body.error.code], origin).toEqual([403, 'bad_origin']);
        expect(await upgradeStatus(server.url, seed.textRoom, { cookie: cookies.owner, origin }), origin).toBe(403);
      }
    });

    it('checks the origin of a sign-in even without a cookie (login CSRF), and lets this site’s own sign-in through', async () => {
      const body = { email: PEOPLE.observer.email, password: PASSWORD };
      const forged = await anon().call<{ error: { code: string } }>('POST', '/api/session', body, { origin: 'http://evil.example' });
      expect([forged.status, forged.body.error.code]).toEqual([403, 'bad_origin']);
      expect(forged.headers.getSetCookie()).toEqual([]);
      const bare = await fetch(`${server.url}/api/session`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
      expect(bare.status).toBe(403);
      expect((await anon().call('POST', '/api/session', body)).status).toBe(200);
    });
  });

  describe('small leaks', () => {
    it('agreement coders= never answers with the name of someone who is not in the study', async () => {
      const stranger = seed.users.outsider.id; // an account, but no member of this study
      const res = await as('lead').call<{ error: { code: string; message: string } }>('GET', `/api/studies/${seed.studyId}/agreement?coders=${seed.users.coder.id},${stranger}`);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toContain('is not a member of this study');
      expect(JSON.stringify(res.body)).not.toContain(PEOPLE.outsider.name);
    });
  });

  describe('validation and bad input', () => {
    it('answers zod failures as 400 {error:{code:"invalid_body",message,details}}', async () => {
      const res = await as('owner').call<{ error: { code: string; message: string; details: Array<{ path: string }> } }>('POST', '/api/studies', { title: 5, mode: 'secret' });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_body');
      expect(typeof res.body.error.message).toBe('string');
      expect(res.body.error.details.map((d) => d.path).sort()).toEqual(['mode', 'title']);
    });

    it('answers malformed JSON 400, a non-JSON body 415, an oversized body 413 and unknown paths 404, all as JSON errors', async () => {
      const bad = await as('owner').call<{ error: { code: string } }>('POST', '/api/studies', '{"title": ');
      expect([bad.status, bad.body.error.code]).toEqual([400, 'invalid_json']);
      const plain = await as('owner').call<{ error: { code: string } }>('POST', '/api/studies', 'title=x', { 'content-type': 'text/plain' });
      expect(plain.status).toBe(415);
      const big = await as('owner').call<{ error: { code: string } }>('POST', `/api/studies/${seed.studyId}/texts`, { title: 'Big', content: 'word '.repeat(20_000) });
      expect([big.status, big.body.error.code]).toEqual([413, 'body_too_large']);
      const nothing = await anon().call<{ error: { code: string } }>('GET', '/api/no-such-thing');
      expect([nothing.status, nothing.body.error.code]).toEqual([404, 'not_found']);
      for (const path of ['/api/studies/not-a-uuid', '/api/texts/%00', `/api/studies/${seed.studyId}/members/1'%20or%201=1`]) {
        const res = await as('owner').call<{ error: { code: string } }>('GET', path);
        expect(res.status, path).toBe(404);
        expect(res.body.error.code, path).toBe('not_found');
      }
      // Still up.
      expect((await anon().call('GET', '/api/health')).status).toBe(200);
    });
  });

  describe('studies and members', () => {
    it('creates a study with its owner and its codebook and memos rooms', async () => {
      const created = await as('lead').call<{ id: string; role: string; codebookRoom: string; memosRoom: string }>('POST', '/api/studies', { title: 'Night-shift bakers', mode: 'reflexive' });
      expect(created.status).toBe(201);
      expect(created.body.role).toBe('owner');
      const got = await as('lead').call<{ codebookRoom: string; memosRoom: string; mode: string }>('GET', `/api/studies/${created.body.id}`);
      expect(got.body).toMatchObject({ codebookRoom: created.body.codebookRoom, memosRoom: created.body.memosRoom, mode: 'reflexive' });
      expect(got.body.codebookRoom).not.toBe(got.body.memosRoom);
      const mine = await as('lead').call<Array<{ id: string }>>('GET', '/api/studies');
      expect(mine.body.map((s) => s.id)).toContain(created.body.id);
      // Not visible to someone outside it.
      expect((await as('coder').call('GET', `/api/studies/${created.body.id}`)).status).toBe(404);
    });

    it('lists members to members, hides the study from outsiders', async () => {
      const list = await as('observer').call<Array<{ userId: string; role: string }>>('GET', `/api/studies/${seed.studyId}/members`);
      expect(list.status).toBe(200);
      expect(Object.fromEntries(list.body.map((m) => [m.userId, m.role]))).toMatchObject({ [seed.users.owner.id]: 'owner', [seed.users.observer.id]: 'observer' });
      expect((await as('outsider').call('GET', `/api/studies/${seed.studyId}/members`)).status).toBe(404);
    });

    it('lets owner and lead manage members; coders, trainees and observers may not; only owners touch the owner role', async () => {
      const base = `/api/studies/${seed.studyId}/members`;
      for (const p of ['coder', 'trainee', 'observer'] as const) {
        const res = await as(p).call<{ error: { code: string } }>('POST', base, { email: PEOPLE.outsider.email, role: 'coder' });
        expect(res.status, p).toBe(403);
        expect(res.body.error.code).toBe('forbidden');
        expect((await as(p).call('DELETE', `${base}/${seed.users.coder2.id}`)).status, p).toBe(403);
      }
      // Someone not yet a member gets an invitation link (202, whether or not the email has an account:
      // member-add.test.ts); an account holder joins with their own password.
      const added = await as('lead').call<{ token: string; role: string }>('POST', base, { email: PEOPLE.outsider.email, role: 'coder' });
      expect([added.status, added.body.role]).toEqual([202, 'coder']);
      expect((await as('outsider').call('GET', `/api/studies/${seed.studyId}`)).status).toBe(404); // not until they accept
      // (accepted from a fresh page: accepting signs in anew, which would replace the outsider's session here)
      expect((await apiClient(server.url).call('POST', `/api/invitations/${added.body.token}/accept`, { password: PASSWORD })).status).toBe(200);
      expect((await as('outsider').call('GET', `/api/studies/${seed.studyId}`)).status).toBe(200);
      expect((await as('lead').call('PATCH', `${base}/${seed.users.outsider.id}`, { role: 'owner' })).status).toBe(403);
      expect((await as('lead').call('DELETE', `${base}/${seed.users.owner.id}`)).status).toBe(403);
      const changed = await as('lead').call<{ role: string }>('PATCH', `${base}/${seed.users.outsider.id}`, { role: 'trainee' });
      expect([changed.status, changed.body.role]).toEqual([200, 'trainee']);
      expect((await as('lead').call('PATCH', `${base}/${seed.users.outsider.id}`, { role: 'boss' })).status).toBe(400);
      expect((await as('lead').call('POST', base, { email: 'nobody@example.test', role: 'coder' })).status).toBe(202); // an invitation, as for anyone
      expect((await as('lead').call('DELETE', `${base}/${seed.users.outsider.id}`)).status).toBe(204);
      expect((await as('outsider').call('GET', `/api/studies/${seed.studyId}`)).status).toBe(404);
      const lastOwner = await as('owner').call<{ error: { code: string } }>('DELETE', `${base}/${seed.users.owner.id}`);
      expect([lastOwner.status, lastOwner.body.error.code]).toEqual([409, 'last_owner']);
    });
  });

  describe('texts and layers', () => {
    it('lets owner and lead add a plain-text transcript; others get 403', async () => {
      const base = `/api/studies/${seed.studyId}/texts`;
      const content = 'Interviewer: What grows best?\nP02: Broad beans, every year.';
      expect((await as('coder').call('POST', base, { title: 'x', content })).status).toBe(403);
      expect((await as('observer').call('POST', base, { title: 'x', content })).status).toBe(403);
      const added = await as('lead').call<{ id: string; room: string; wordCount: number }>('POST', base, { title: 'Allotment interview 2', content });
      expect(added.status).toBe(201);
      expect(added.body.wordCount).toBe(7); // "What grows best?" + "Broad beans, every year." (speaker labels are not words of the turn)
      const list = await as('observer').call<Array<{ id: string; room: string }>>('GET', base);
      expect(list.body.map((t) => t.id)).toEqual([seed.textId, added.body.id]);
      expect(list.body[1]!.room).toBe(added.body.room);
      expect((await as('lead').call('POST', base, { title: 'Empty', content: ' \n \n' })).status).toBe(400);
    });

    it('creates a coder’s own layer on first open, once, and lists the layers each role may open', async () => {
      const path = `/api/texts/${seed.textId}`;
      type Detail = { room: string; canWrite: boolean; layers: Array<{ room: string; coderId: string; mine: boolean; canWrite: boolean }> };
      const first = await as('coder').call<Detail>('GET', path);
      expect(first.status).toBe(200);
      expect(first.body.room).toBe(seed.textRoom);
      expect(first.body.canWrite).toBe(false);
      const own = first.body.layers.find((l) => l.mine)!;
      expect(own).toMatchObject({ coderId: seed.users.coder.id, canWrite: true });
      const again = await as('coder').call<Detail>('GET', path);
      expect(again.body.layers.filter((l) => l.mine).map((l) => l.room)).toEqual([own.room]);

      const other = await as('coder2').call<Detail>('GET', path);
      expect(other.body.layers.find((l) => l.coderId === seed.users.coder.id)).toMatchObject({ room: own.room, mine: false, canWrite: false });
      expect(other.body.layers.filter((l) => l.mine)).toHaveLength(1);

      const observer = await as('observer').call<Detail>('GET', path);
      expect(observer.body.layers.some((l) => l.mine)).toBe(false);
      expect(observer.body.layers.every((l) => !l.canWrite)).toBe(true);
      expect((await as('lead').call<Detail>('GET', path)).body.canWrite).toBe(true);
      expect((await as('outsider').call('GET', path)).status).toBe(404);
    });
  });

  describe('study settings and audit log', () => {
    it('lets only the owner change a study, e.g. set a retention date (DESIGN §8)', async () => {
      const path = `/api/studies/${seed.studyId}`;
      expect((await as('lead').call('PATCH', path, { title: 'Renamed' })).status).toBe(403);
      expect((await as('owner').call('PATCH', path, {})).status).toBe(400);
      expect((await as('owner').call('PATCH', path, { retentionUntil: '31/12/2031' })).status).toBe(400);
      const res = await as('owner').call<{ retentionUntil: string; title: string }>('PATCH', path, { retentionUntil: '2031-12-31T00:00:00Z' });
      expect(res.status).toBe(200);
      expect(res.body.retentionUntil).toBe('2031-12-31T00:00:00.000Z');
      expect((await as('coder').call<{ retentionUntil: string }>('GET', path)).body.retentionUntil).toBe('2031-12-31T00:00:00.000Z');
    });

    it('shows the audit log to owner and lead, newest first, with paging; not to coders', async () => {
      const path = `/api/studies/${seed.studyId}/audit`;
      expect((await as('coder').call('GET', path)).status).toBe(403);
      expect((await as('lead').call('GET', `${path}?limit=0`)).status).toBe(400);
      const all = await as('lead').call<Array<{ id: number; action: string; userName: string | null }>>('GET', path);
      expect(all.status).toBe(200);
      const ids = all.body.map((e) => e.id);
      expect([...ids].sort((a, b) => b - a)).toEqual(ids);
      expect(all.body.map((e) => e.action)).toEqual(expect.arrayContaining(['study.create', 'member.add', 'text.import', 'study.update']));
      expect(all.body.find((e) => e.action === 'study.create')?.userName).toBe(PEOPLE.owner.name);
      const page = await as('lead').call<Array<{ id: number }>>('GET', `${path}?limit=2&before=${ids[1]}`);
      expect(page.body.map((e) => e.id)).toEqual(ids.slice(2, 4));
      const schemaCheck = S.AuditEntry.safeParse(all.body[0]);
      expect(schemaCheck.success).toBe(true);
    });
  });

  describe('sync upgrade authorization', () => {
    it('answers 403 for a foreign origin, 401 without a session, 404 for an unknown room, 403 for a non-member, 101 for a member', async () => {
      const origin = server.url;
      expect(await upgradeStatus(server.url, seed.textRoom, { origin: 'http://evil.example', cookie: cookies.coder })).toBe(403);
      expect(await upgradeStatus(server.url, seed.textRoom, { origin })).toBe(401);
      expect(await upgradeStatus(server.url, seed.textRoom, { origin, cookie: 'gloss_session=aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa' })).toBe(401);
      expect(await upgradeStatus(server.url, '00000000-0000-4000-8000-000000000000', { origin, cookie: cookies.coder })).toBe(404);
      expect(await upgradeStatus(server.url, 'not-a-room', { origin, cookie: cookies.coder })).toBe(404);
      expect(await upgradeStatus(server.url, seed.codebookRoom, { origin, cookie: cookies.outsider })).toBe(403);
      expect(await upgradeStatus(server.url, seed.textRoom, { origin, cookie: cookies.observer })).toBe(101);
      expect(await upgradeStatus(server.url, seed.memosRoom, { origin, cookie: cookies.trainee })).toBe(101);
    });
  });

  // Last: these stop or restart the server.
  it('slides a session used past half its life and ends an expired one (expires_at moved in the database)', async () => {
    const token = cookies.coder.split('=')[1]!;
    const { sessionIdFromToken } = await import('../../apps/server/src/auth/tokens.js');
    const id = sessionIdFromToken(token);
    const setExpiry = (interval: string) => async (db: Parameters<Parameters<SpawnedServer<BasicSeed>['withDb']>[0]>[0]) => {
      await db.update(sessions).set({ expiresAt: sql`now() + ${sql.raw(`interval '${interval}'`)}` }).where(sql`${sessions.id} = ${id}`);
    };
    const readExpiry = async () =>
      (await server.withDb((db) => db.select({ e: sessions.expiresAt }).from(sessions).where(sql`${sessions.id} = ${id}`)))[0]?.e;

    // 29 of 30 days left: first half of its life → not renewed, no cookie sent.
    if (kind === 'pglite') await server.restart(setExpiry('29 days'));
    else await server.withDb(setExpiry('29 days'));
    const fresh = await as('coder').call('GET', '/api/me');
    expect(fresh.status).toBe(200);
    expect(sessionCookieFrom(fresh.headers)).toBeNull();

    // One hour left of 30 days: past half-life → renewed, cookie re-sent.
    if (kind === 'pglite') await server.restart(setExpiry('1 hour'));
    else await server.withDb(setExpiry('1 hour'));
    const renewed = await as('coder').call('GET', '/api/me');
    expect(renewed.status).toBe(200);
    expect(sessionCookieFrom(renewed.headers)).toBe(cookies.coder);
    if (kind === 'pglite') await server.kill();
    const newExpiry = await readExpiry();
    expect(newExpiry!.getTime()).toBeGreaterThan(Date.now() + 29 * 86_400_000);

    // Already past: refused and removed.
    if (kind === 'pglite') await server.restart(setExpiry('-1 second'));
    else await server.withDb(setExpiry('-1 second'));
    expect((await as('coder').call('GET', '/api/me')).status).toBe(401);
    if (kind === 'pglite') await server.kill();
    expect(await readExpiry()).toBeUndefined();
  }, 300_000); // PGlite is single-process: three stop/seed/start cycles (each 30-40 s on a loaded machine)

  it('logged study creation, member changes and text import in the audit log', async () => {
    await server.kill();
    const actions = await server.withDb(async (db) => (await db.select({ action: auditLog.action }).from(auditLog)).map((r) => r.action));
    for (const action of ['study.create', 'member.add', 'member.role', 'member.remove', 'text.import']) expect(actions).toContain(action);
  }, 60_000); // a graceful stop, then PGlite opened in this process
});
