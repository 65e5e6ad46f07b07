/**
 * "Ready" means ready: while a start-up step (the demo being seeded) runs, /api/health answers 503 and
 * names it, sign-in and sync answer 503, and only afterwards does health answer ok. Health's connection
 * and room counts are for owners only. Sources: RFC 9110 §15.6.4 (503 with Retry-After for a temporary
 * condition); "readiness vs liveness" probes are common practice.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { loadConfig, startServer, type RunningServer } from '../../apps/server/src/index.js';
import { freshPgliteDir } from '../support/database.js';
import { apiClient, signIn, upgradeStatus } from '../support/http.js';
import { PASSWORD, PEOPLE, seedBasic, type BasicSeed } from '../support/seed.js';

describe('server readiness', () => {
  let server: RunningServer | undefined;
  let remove = () => undefined as void;
  afterAll(async () => {
    await server?.close();
    remove();
  });

  it('answers 503 naming the pending step until it is done, then ok; counts only to owners', async () => {
    const folder = await freshPgliteDir();
    remove = folder.remove;
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    let seeded!: BasicSeed;
    let gotUrl!: (url: string) => void;
    const urlKnown = new Promise<string>((r) => (gotUrl = r));
    const starting = startServer(loadConfig({ PORT: '0', DATA_DIR: folder.dir, LOG_LEVEL: 'silent' }), undefined, {
      prepare: {
        what: 'demo study seeding',
        async run(db, url) {
          seeded = await seedBasic(db);
          gotUrl(url);
          await gate;
        },
      },
    });
    const url = await urlKnown;

    const early = await apiClient(url).call<{ ok: boolean; waiting: string[] }>('GET', '/api/health');
    expect(early.status).toBe(503);
    expect(early.body).toMatchObject({ ok: false, waiting: ['demo study seeding'] });
    expect(Number(early.headers.get('retry-after'))).toBeGreaterThan(0);
    // The accounts exist already, but nobody signs in to a half-prepared server.
    const signInEarly = await apiClient(url).call<{ error: { code: string; message: string } }>('POST', '/api/session', { email: PEOPLE.owner.email, password: PASSWORD });
    expect(signInEarly.status).toBe(503);
    expect(signInEarly.body.error.code).toBe('not_ready');
    expect(signInEarly.body.error.message).toContain('demo study seeding');
    expect(await upgradeStatus(url, seeded.textRoom, { origin: url })).toBe(503);

    release();
    server = await starting;
    const ready = await apiClient(url).call<Record<string, unknown>>('GET', '/api/health');
    expect(ready.status).toBe(200);
    expect(ready.body).toEqual({ ok: true, db: 'pglite' }); // no counts for an anonymous caller

    const coder = await signIn(url, PEOPLE.coder.email, PASSWORD);
    expect((await apiClient(url, coder).call<Record<string, unknown>>('GET', '/api/health')).body).not.toHaveProperty('sync');
    const owner = await signIn(url, PEOPLE.owner.email, PASSWORD);
    const forOwner = await apiClient(url, owner).call<{ sync: { connections: number; rooms: number } }>('GET', '/api/health');
    expect(forOwner.body.sync).toMatchObject({ connections: 0, rooms: 0 });
  }, 120_000);
});
