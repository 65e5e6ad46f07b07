/**
 * The session cookie's flags on a real server behind https (PUBLIC_URL=https://…): HttpOnly,
 * SameSite=Lax, Path=/ and Secure, as the Lucia session guide sets them (RFC 6265bis §4.1.2); the
 * plain-http case is in api.test.ts. Sign-out clears it with Max-Age=0 and the same flags.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionCookieFrom } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';
import { spawnServer, type SpawnedServer } from '../support/server.js';

const PUBLIC = 'https://gloss.example.test';

describe('session cookie behind https', () => {
  let server: SpawnedServer<BasicSeed>;
  beforeAll(async () => {
    server = await spawnServer({ db: 'pglite', seed: seedBasic, env: { PUBLIC_URL: PUBLIC }, startTimeoutMs: 180_000 });
  }, 240_000);
  afterAll(async () => server?.stop());

  it('is Secure, HttpOnly, SameSite=Lax on sign-in, and cleared the same way on sign-out', async () => {
    const signIn = await fetch(`${server.url}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: PUBLIC },
      body: JSON.stringify({ email: PEOPLE.coder.email, password: PASSWORD }),
    });
    expect(signIn.status).toBe(200);
    const set = signIn.headers.getSetCookie().find((l) => l.startsWith('gloss_session='))!;
    expect(set.split(/;\s*/).slice(1).sort()).toEqual(expect.arrayContaining(['HttpOnly', 'SameSite=Lax', 'Path=/', 'Secure']));
    const cookie = sessionCookieFrom(signIn.headers)!;
    // Another origin (the plain-http one) may not use it to change anything.
    expect((await fetch(`${server.url}/api/session`, { method: 'DELETE', headers: { cookie, origin: server.url } })).status).toBe(403);
    const out = await fetch(`${server.url}/api/session`, { method: 'DELETE', headers: { cookie, origin: PUBLIC } });
    expect(out.status).toBe(204);
    const cleared = out.headers.getSetCookie().find((l) => l.startsWith('gloss_session='))!;
    expect(cleared).toMatch(/Max-Age=0/);
    expect(cleared).toMatch(/Secure/);
    expect((await fetch(`${server.url}/api/me`, { headers: { cookie } })).status).toBe(401);
  }, 60_000);
});
