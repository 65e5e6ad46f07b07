/**
 * The authorisation matrix: every HTTP route the app really registers × every role (anonymous, each
 * study role, a member of another study), generated from one table (route-rights.ts). A route missing
 * from the table fails with its name; every call by someone the table does not allow must be refused
 * (401 without a session, otherwise 4xx) — zero unauthorised successes, and never a 500.
 * Role rules: access/policy.ts and the brief (DESIGN §6); status codes: RFC 9110 §15.5.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../apps/server/src/http/app.js';
import { apiClient, signIn } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed, type Person } from '../support/seed.js';
import { dbKinds, spawnServer, type SpawnedServer } from '../support/server.js';
import { ROUTE_RIGHTS, STUDY_ROLES, type Rights } from './route-rights.js';

type Who = 'anonymous' | 'owner' | 'lead' | 'coder' | 'trainee' | 'observer' | 'outsider';
const EVERYONE: Who[] = ['anonymous', ...STUDY_ROLES, 'outsider'];

/** The app's own route list (method + path as registered), without middleware entries. */
function registeredRoutes(): string[] {
  // Only to enumerate routes: buildApp registers them without touching its dependencies.
  const app = buildApp({ config: { maxBodyBytes: 1024, publicUrl: undefined, webDist: '/nonexistent', trustProxy: 0 } } as never);
  return [...new Set(app.routes.filter((r) => r.method !== 'ALL').map((r) => `${r.method} ${r.path}`))];
}

function allowed(rights: Rights, who: Who): boolean {
  if (rights === 'anyone') return true;
  if (rights === 'signed-in') return who !== 'anonymous';
  return (rights as readonly string[]).includes(who);
}

describe('every route has an entry in the rights table', () => {
  it('lists each registered route in route-rights.ts (add one line there for a new route)', () => {
    const missing = registeredRoutes().filter((r) => !(r in ROUTE_RIGHTS));
    expect(missing, `routes without an entry in test/server/route-rights.ts: ${missing.join(', ')}`).toEqual([]);
    const stale = Object.keys(ROUTE_RIGHTS).filter((r) => !registeredRoutes().includes(r));
    expect(stale, 'entries for routes the app no longer has').toEqual([]);
  });
});

describe.each(dbKinds())('authorisation matrix on %s', (kind) => {
  let server: SpawnedServer<BasicSeed>;
  const cookies = {} as Record<Person, string>;
  const params: Record<string, string> = {};

  beforeAll(async () => {
    server = await spawnServer({ db: kind, seed: seedBasic });
    const seed = server.seeded;
    for (const p of Object.keys(PEOPLE) as Person[]) cookies[p] = await signIn(server.url, PEOPLE[p].email, PASSWORD);
    // The outsider is a member of another study: their own.
    expect((await apiClient(server.url, cookies.outsider).call('POST', '/api/studies', { title: 'Another study' })).status).toBe(201);
    const version = await apiClient(server.url, cookies.lead).call<{ id: string }>('POST', `/api/documents/${seed.textRoom}/versions`, { name: 'matrix' });
    const invitation = await apiClient(server.url, cookies.owner).call<{ id: string }>('POST', `/api/studies/${seed.studyId}/invitations`, { email: 'invited@example.test', role: 'coder' });
    Object.assign(params, {
      studyId: seed.studyId,
      textId: seed.textId,
      room: seed.textRoom,
      userId: seed.users.coder2.id,
      versionId: version.body.id,
      invitationId: invitation.body.id ?? randomUUID(),
      // No round or comment exists in this seed: their routes are checked against unknown ids (refusal by 404).
      roundId: randomUUID(),
      commentId: randomUUID(),
      token: 'not-a-real-token',
    });
  }, 180_000);
  afterAll(async () => {
    await server?.stop();
  });

  it('refuses everyone the table does not allow, on every route (zero unauthorised successes)', async () => {
    const successes: string[] = [];
    const badRefusals: string[] = [];
    for (const route of registeredRoutes()) {
      const rights = ROUTE_RIGHTS[route]!;
      const [method, pattern] = route.split(' ') as [string, string];
      const path = pattern.replace(/:(\w+)/g, (_, name: string) => encodeURIComponent(params[name] ?? randomUUID())).replace('/*', '/');
      for (const who of EVERYONE) {
        if (allowed(rights, who)) continue; // those allowed are exercised by the route's own tests
        const client = apiClient(server.url, who === 'anonymous' ? undefined : cookies[who as Person]);
        const res = await client.call(method, path, method === 'GET' || method === 'DELETE' ? undefined : {});
        const cell = `${who} ${method} ${path} → ${res.status}`;
        if (res.status < 400) successes.push(cell);
        else if (res.status >= 500 || (who === 'anonymous' && res.status !== 401)) badRefusals.push(cell);
      }
    }
    expect(successes, 'unauthorised successes').toEqual([]);
    expect(badRefusals, 'refusals that are not clean (anonymous must get 401; nobody a 5xx)').toEqual([]);
  }, 300_000);
});
