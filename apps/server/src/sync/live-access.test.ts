/**
 * Live access in process, against the real RoomAuthorizer on PGlite (and, with REDIS_URL, the real
 * Redis relay between two services): which open connections a change reaches, what happens to them
 * (closed with a reason, narrowed to read-only, left alone), session expiry, and an upgrade that
 * was being authorized while a change happened. The connections are stand-ins that record what
 * they were told; the real sockets are exercised in test/server/live-access.test.ts.
 */
import type { IncomingMessage } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sessions as sessionsTable, type Database } from '@gloss/db';
import { openTestDatabase } from '../../../../test/support/database.js';
import { seedBasic, type BasicSeed, type Person } from '../../../../test/support/seed.js';
import { waitFor } from '../../../../test/support/wait.js';
import { LOST_ACCESS, createRoomAuthorizer } from '../access/authorizer.js';
import { addMember, removeMember } from '../admin/studies.js';
import { ensureLayer } from '../admin/texts.js';
import { createSessionService, type SessionService } from '../auth/sessions.js';
import { sessionIdFromToken } from '../auth/tokens.js';
import { createRedisRelay, noRelay } from '../relay/index.js';
import type { RoomAuthorizer, RoomGrant } from './contracts.js';
import { createLiveAccess, type LiveAccessService, type LiveConnection } from './live-access.js';

const HOST = 'gloss.test:8080';
const quiet = { warn: () => {}, error: () => {} };

class Recorded implements LiveConnection {
  revoked: string | null = null;
  regrants = 0;
  constructor(public grant: RoomGrant) {}
  regrant(grant: RoomGrant) {
    this.regrants++;
    this.grant = grant;
  }
  revoke(reason: string) {
    this.revoked = reason;
  }
}

describe('live access', () => {
  let database: Database;
  let seed: BasicSeed;
  let sessions: SessionService;
  let authorizer: RoomAuthorizer;
  const services: LiveAccessService[] = [];

  beforeAll(async () => {
    database = await openTestDatabase('pglite');
    seed = await seedBasic(database.db);
    sessions = createSessionService(database.db, 86_400_000);
    authorizer = createRoomAuthorizer({ db: database.db, sessions, publicUrl: undefined });
  }, 120_000); // a PGlite copy and seeding (argon2 per account) on a loaded machine
  afterAll(async () => {
    for (const s of services) await s.close();
    await database?.close();
  });

  const service = async (options: Partial<Parameters<typeof createLiveAccess>[0]> = {}) => {
    const s = createLiveAccess({ authorizer, relay: noRelay(), logger: quiet, ...options });
    await s.start();
    services.push(s);
    return s;
  };
  const signIn = async (p: Person, via: SessionService = sessions) => (await via.create(seed.users[p].id)).token;
  const open = async (token: string, room: string, via: RoomAuthorizer = authorizer) =>
    new Recorded(await via.authorize({ headers: { host: HOST, origin: `http://${HOST}`, cookie: `gloss_session=${token}` } } as unknown as IncomingMessage, room));

  it('re-checks only the connections a change names, and closes or narrows them', async () => {
    const live = await service();
    const coder = await signIn('coder2');
    const other = await signIn('trainee');
    const layer = await ensureLayer(database.db, seed.studyId, seed.textId, seed.users.coder2.id);
    const own = await open(coder, layer);
    const memos = await open(coder, seed.memosRoom);
    const bystander = await open(other, seed.memosRoom);
    for (const c of [own, memos, bystander]) live.track(c, live.stamp());
    expect(own.grant.canWrite).toBe(true);

    // coder → observer: still reads, no longer writes; the trainee is not even looked at.
    await addMember(database.db, seed.studyId, seed.users.coder2.id, 'observer');
    await live.changed({ studyId: seed.studyId, userId: seed.users.coder2.id });
    expect([own.revoked, memos.revoked]).toEqual([null, null]);
    expect([own.grant.canWrite, memos.grant.canWrite, own.grant.role]).toEqual([false, false, 'observer']);
    expect(bystander.regrants).toBe(0);

    // A change for another study, or a room the connection is not in, passes it by.
    await live.changed({ studyId: '6f1c1d2e-0000-4000-8000-000000000000', userId: seed.users.coder2.id });
    await live.changed({ roomIds: [seed.codebookRoom] });
    expect(own.regrants).toBe(1);

    // Room ids in any casing name the same room.
    await live.changed({ roomIds: [layer.toUpperCase()] });
    expect([own.regrants, memos.regrants]).toEqual([2, 1]);

    await removeMember(database.db, seed.studyId, seed.users.coder2.id);
    await live.changed({ userId: seed.users.coder2.id });
    expect([own.revoked, memos.revoked]).toEqual([LOST_ACCESS.notMember, LOST_ACCESS.notMember]);
    expect(bystander.revoked).toBeNull();
    expect(live.size()).toBe(1);
  });

  it('ends only the signed-out session’s connections', async () => {
    const live = await service();
    const first = await signIn('trainee');
    const second = await signIn('trainee');
    const a = await open(first, seed.codebookRoom);
    const b = await open(second, seed.codebookRoom);
    live.track(a, live.stamp());
    live.track(b, live.stamp());
    await sessions.invalidate(first);
    await live.changed({ sessionId: sessionIdFromToken(first) });
    expect(a.revoked).toBe(LOST_ACCESS.signedOut);
    expect(b.revoked).toBeNull();
    expect(b.regrants).toBe(0);
  });

  it('closes a connection when its session expires, and follows a session that slid forward', async () => {
    const live = await service();
    // The session's expiry is set in the database and copied into the grant, so nothing here races the clock.
    const expireSoon = async (token: string, grant: RoomGrant, inMs: number) => {
      const expiresAt = new Date(Date.now() + inMs);
      await database.db.update(sessionsTable).set({ expiresAt }).where(eq(sessionsTable.id, sessionIdFromToken(token)));
      return new Recorded({ ...grant, sessionExpiresAt: expiresAt });
    };

    const token = await signIn('observer');
    const expiring = await expireSoon(token, (await open(token, seed.textRoom)).grant, 300);
    live.track(expiring, live.stamp());
    await waitFor(() => expiring.revoked !== null, 'the connection is closed at its session’s expiry');
    expect(expiring.revoked).toBe(LOST_ACCESS.expired);

    // A session used over HTTP before it ran out slid forward: the connection is re-armed, not closed.
    const usedToken = await signIn('observer');
    const kept = await expireSoon(usedToken, (await open(usedToken, seed.textRoom)).grant, 300);
    const firstExpiry = kept.grant.sessionExpiresAt.getTime();
    expect((await sessions.validate(usedToken))?.renewed).toBe(true);
    live.track(kept, live.stamp());
    await waitFor(() => kept.revoked !== null || kept.grant.sessionExpiresAt.getTime() > firstExpiry, 're-checked at the first expiry');
    expect(kept.revoked).toBeNull();
  });

  it('re-checks a connection whose upgrade was being authorized while a change went by', async () => {
    const live = await service();
    const token = await signIn('lead');
    const stamp = live.stamp(); // taken before authorizing, as the upgrade does
    const late = await open(token, seed.memosRoom);
    await addMember(database.db, seed.studyId, seed.users.lead.id, 'observer');
    await live.changed({ userId: seed.users.lead.id }); // nothing followed yet: reaches nobody
    live.track(late, stamp);
    await waitFor(() => !late.grant.canWrite, 'the late connection gets the new role');
    await addMember(database.db, seed.studyId, seed.users.lead.id, 'lead');
  });
});

describe.runIf(process.env.REDIS_URL)('live access across two nodes (Redis relay)', () => {
  let database: Database;
  let seed: BasicSeed;
  const closers: Array<() => Promise<unknown>> = [];

  beforeAll(async () => {
    database = await openTestDatabase('pglite');
    seed = await seedBasic(database.db);
  }, 120_000);
  afterAll(async () => {
    for (const close of closers.reverse()) await close();
    await database?.close();
  });

  it('applies a change made on one node to the other node’s connections', async () => {
    const sessions = createSessionService(database.db, 86_400_000);
    const authorizer = createRoomAuthorizer({ db: database.db, sessions, publicUrl: undefined });
    const nodes = await Promise.all(
      [0, 1].map(async () => {
        const relay = await createRedisRelay(process.env.REDIS_URL!);
        const live = createLiveAccess({ authorizer, relay, logger: quiet });
        await live.start();
        closers.push(() => relay.close(), () => live.close());
        return live;
      }),
    );
    const token = (await sessions.create(seed.users.coder.id)).token;
    const grant = await authorizer.authorize(
      { headers: { host: HOST, origin: `http://${HOST}`, cookie: `gloss_session=${token}` } } as unknown as IncomingMessage,
      seed.memosRoom,
    );
    const atSecond = new Recorded(grant);
    nodes[1]!.track(atSecond, nodes[1]!.stamp());
    await sessions.invalidate(token);
    await nodes[0]!.changed({ sessionId: sessionIdFromToken(token) });
    await waitFor(() => atSecond.revoked !== null, 'the other node closes the signed-out connection');
    expect(atSecond.revoked).toBe(LOST_ACCESS.signedOut);
  });
});
