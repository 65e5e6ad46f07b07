/** Sliding expiry as in the Lucia project's session guide: renew when past half-life; expired → gone. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessions as sessionsTable, users, type Database } from '@gloss/db';
import { eq } from 'drizzle-orm';
import { openTestDatabase } from '../../../../test/support/database.js';
import { createSessionService } from './sessions.js';
import { sessionIdFromToken } from './tokens.js';

const DAY = 86_400_000;

describe('sessions (PGlite)', () => {
  let database: Database;
  let userId: string;
  beforeAll(async () => {
    database = await openTestDatabase('pglite');
    const [u] = await database.db.insert(users).values({ email: 'kofi@example.test', name: 'Kofi', passwordHash: 'x' }).returning();
    userId = u!.id;
  });
  afterAll(() => database?.close());

  it('stores only the SHA-256 of the token', async () => {
    const service = createSessionService(database.db, 30 * DAY);
    const { token } = await service.create(userId);
    const rows = await database.db.select().from(sessionsTable).where(eq(sessionsTable.userId, userId));
    expect(rows.map((r) => r.id)).toContain(sessionIdFromToken(token));
    expect(rows.map((r) => r.id)).not.toContain(token);
  });

  it('keeps the expiry in the first half of the life, slides it in the second, and ends it after', async () => {
    let now = Date.UTC(2030, 0, 1);
    const service = createSessionService(database.db, 30 * DAY, () => now);
    const { token, expiresAt } = await service.create(userId);
    expect(expiresAt.getTime()).toBe(now + 30 * DAY);

    now += 10 * DAY;
    const early = await service.validate(token);
    expect(early?.renewed).toBe(false);
    expect(early?.expiresAt.getTime()).toBe(Date.UTC(2030, 0, 1) + 30 * DAY);
    expect(early?.user.email).toBe('kofi@example.test');

    now += 6 * DAY; // 16 days in: past half-life
    const late = await service.validate(token);
    expect(late?.renewed).toBe(true);
    expect(late?.expiresAt.getTime()).toBe(now + 30 * DAY);

    // Checking without extending (the WebSocket upgrade) leaves the expiry where it is.
    now += 20 * DAY;
    const unchanged = await service.validate(token, { extend: false });
    expect(unchanged?.renewed).toBe(false);
    expect(unchanged?.expiresAt.getTime()).toBe(late!.expiresAt.getTime());

    now += 10 * DAY + 1;
    expect(await service.validate(token)).toBeNull();
    const left = await database.db.select().from(sessionsTable).where(eq(sessionsTable.id, sessionIdFromToken(token)));
    expect(left).toEqual([]);
  });

  it('invalidates a session, and ignores tokens that are not ours', async () => {
    const service = createSessionService(database.db, DAY);
    const { token } = await service.create(userId);
    expect(await service.validate(token)).not.toBeNull();
    await service.invalidate(token);
    expect(await service.validate(token)).toBeNull();
    expect(await service.validate("'; drop table users; --")).toBeNull();
  });

  it('checks a session by its id without extending it, and not after it expired', async () => {
    let now = Date.UTC(2032, 0, 1);
    const service = createSessionService(database.db, 10 * DAY, () => now);
    const { token, expiresAt } = await service.create(userId);
    now += 9 * DAY; // past half-life: validate() would slide it, check() must not
    const checked = await service.check(sessionIdFromToken(token));
    expect(checked).toMatchObject({ sessionId: sessionIdFromToken(token), renewed: false, user: { id: userId } });
    expect(checked?.expiresAt.getTime()).toBe(expiresAt.getTime());
    now += DAY;
    expect(await service.check(sessionIdFromToken(token))).toBeNull();
    expect(await service.check('not-a-session')).toBeNull();
  });
});
