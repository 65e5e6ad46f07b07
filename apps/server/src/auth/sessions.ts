/**
 * Sessions after the Lucia project's guide: create, validate with sliding expiry (a session used in
 * the second half of its life is extended to a full lifetime), invalidate.
 */
import { type Db, sessions, users } from '@gloss/db';
import { eq, lt } from 'drizzle-orm';
import { generateSessionToken, looksLikeToken, sessionIdFromToken } from './tokens.js';

export interface SessionUser {
  id: string;
  email: string;
  name: string;
}

export interface ValidSession {
  sessionId: string;
  user: SessionUser;
  expiresAt: Date;
  /** True when this validation moved the expiry forward: the cookie should be sent again. */
  renewed: boolean;
}

export interface SessionService {
  create(userId: string): Promise<{ token: string; expiresAt: Date }>;
  /**
   * The session behind a token, or null. `extend: false` checks without sliding the expiry: for
   * callers that cannot send the renewed cookie back (the WebSocket upgrade), so the browser's
   * cookie and the stored expiry stay in step.
   */
  validate(token: string, options?: { extend?: boolean }): Promise<ValidSession | null>;
  /**
   * The session with this id (the token's SHA-256), or null when it was signed out, invalidated or
   * has expired. Never extends: for re-checking open sync connections, which know only the id.
   */
  check(sessionId: string): Promise<ValidSession | null>;
  invalidate(token: string): Promise<void>;
  invalidateAllFor(userId: string): Promise<void>;
  deleteExpired(): Promise<number>;
}

export function createSessionService(db: Db, sessionMs: number, now: () => number = Date.now): SessionService {
  async function lookup(sessionId: string, extend: boolean): Promise<ValidSession | null> {
    const [row] = await db
      .select({ expiresAt: sessions.expiresAt, id: users.id, email: users.email, name: users.name })
      .from(sessions)
      .innerJoin(users, eq(users.id, sessions.userId))
      .where(eq(sessions.id, sessionId));
    if (!row) return null;
    const t = now();
    if (t >= row.expiresAt.getTime()) {
      await db.delete(sessions).where(eq(sessions.id, sessionId));
      return null;
    }
    let expiresAt = row.expiresAt;
    let renewed = false;
    if (extend && t >= expiresAt.getTime() - sessionMs / 2) {
      expiresAt = new Date(t + sessionMs);
      renewed = true;
      await db.update(sessions).set({ expiresAt }).where(eq(sessions.id, sessionId));
    }
    return { sessionId, user: { id: row.id, email: row.email, name: row.name }, expiresAt, renewed };
  }

  return {
    async create(userId) {
      const token = generateSessionToken();
      const expiresAt = new Date(now() + sessionMs);
      await db.insert(sessions).values({ id: sessionIdFromToken(token), userId, expiresAt });
      return { token, expiresAt };
    },

    async validate(token, { extend = true } = {}) {
      if (!looksLikeToken(token)) return null;
      return lookup(sessionIdFromToken(token), extend);
    },

    check(sessionId) {
      return lookup(sessionId, false);
    },

    async invalidate(token) {
      if (!looksLikeToken(token)) return;
      await db.delete(sessions).where(eq(sessions.id, sessionIdFromToken(token)));
    },

    async invalidateAllFor(userId) {
      await db.delete(sessions).where(eq(sessions.userId, userId));
    },

    async deleteExpired() {
      const gone = await db.delete(sessions).where(lt(sessions.expiresAt, new Date(now()))).returning({ id: sessions.id });
      return gone.length;
    },
  };
}
