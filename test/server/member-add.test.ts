/**
 * Adding someone to a study by email does not tell the manager whether that email has an account on
 * the server (issue 13, small leaks): an account holder who is not a member and an unknown address get
 * the same answer — an invitation link (202), same fields — and the link works for both (issue 12's
 * invitation flow: the account holder gives their password, the newcomer a name and a password).
 * The two paths do the same work (one look-up among the study's members, one insert, one audit entry);
 * timing is not asserted here (no timed assertions). Common practice (account enumeration, OWASP).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiClient, signIn } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';

type Invited = { invited: boolean; id: string; email: string; role: string; expiresAt: string; token: string; path: string };

describe('adding a member by email', () => {
  let server: SpawnedServer<BasicSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db: 'pglite', seed: seedBasic, startTimeoutMs: 180_000 });
  }, 240_000);
  afterAll(async () => server?.stop());

  it('answers an account holder and an unknown address alike, and the link works for both', async () => {
    const { url, seeded } = server;
    const owner = apiClient(url, await signIn(url, PEOPLE.owner.email, PASSWORD));
    const path = `/api/studies/${seeded.studyId}/members`;
    const before = await owner.call<unknown[]>('GET', path);

    const holder = await owner.call<Invited>('POST', path, { email: PEOPLE.outsider.email.toUpperCase(), role: 'coder' });
    const unknown = await owner.call<Invited>('POST', path, { email: 'nobody.here@example.test', role: 'coder' });
    expect(holder.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(Object.keys(holder.body).sort()).toEqual(Object.keys(unknown.body).sort());
    expect(holder.body).not.toHaveProperty('userId');
    expect(holder.body).not.toHaveProperty('name');
    expect({ ...holder.body, id: '', email: '', token: '', path: '', expiresAt: '' }).toEqual({ ...unknown.body, id: '', email: '', token: '', path: '', expiresAt: '' });
    // Nobody joined yet: the member list (which a manager reads) says nothing either.
    expect((await owner.call<unknown[]>('GET', path)).body).toEqual(before.body);

    // The account holder joins with their own password …
    const joined = await apiClient(url).call('POST', `/api/invitations/${holder.body.token}/accept`, { password: PASSWORD });
    expect(joined.status).toBe(200);
    // … the newcomer with a name and a password.
    const created = await apiClient(url).call('POST', `/api/invitations/${unknown.body.token}/accept`, { name: 'Noor Ashdown', password: 'a-new-password-9' });
    expect(created.status).toBe(200);
    const after = (await owner.call<Array<{ email: string; role: string }>>('GET', path)).body;
    expect(after).toEqual(expect.arrayContaining([
      expect.objectContaining({ email: PEOPLE.outsider.email, role: 'coder' }),
      expect.objectContaining({ email: 'nobody.here@example.test', role: 'coder' }),
    ]));
  }, 60_000);

  it('changes the role of someone who is already a member (the list shows them anyway)', async () => {
    const { url, seeded } = server;
    const owner = apiClient(url, await signIn(url, PEOPLE.owner.email, PASSWORD));
    const changed = await owner.call<{ userId: string; role: string }>('POST', `/api/studies/${seeded.studyId}/members`, { email: PEOPLE.coder2.email, role: 'observer' });
    expect(changed.status).toBe(200);
    expect(changed.body).toMatchObject({ userId: seeded.users.coder2.id, role: 'observer' });
    // A lead may not make anyone an owner, member or not.
    const lead = apiClient(url, await signIn(url, PEOPLE.lead.email, PASSWORD));
    expect((await lead.call('POST', `/api/studies/${seeded.studyId}/members`, { email: 'someone.else@example.test', role: 'owner' })).status).toBe(403);
  }, 60_000);
});
