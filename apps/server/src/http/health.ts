/**
 * GET /api/health: 200 `{ok:true, db}` once the server is ready and the database answers; 503
 * `{ok:false, db, waiting:[…]}` while start-up steps (the demo being seeded) are pending. Connection and
 * room counts are shown only to a signed-in owner of a study: they tell an outsider how busy the server is.
 */
import { and, eq, sql } from 'drizzle-orm';
import { memberships } from '@gloss/db';
import { Hono } from 'hono';
import { readSessionToken } from '../auth/cookies.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';

export function healthRoutes(deps: AppDeps) {
  return new Hono<AppEnv>().get('/health', async (c) => {
    try {
      await deps.db.execute(sql`select 1`);
    } catch {
      throw new HttpError(503, 'internal', 'The database does not answer.');
    }
    const waiting = deps.readiness?.pending() ?? [];
    if (waiting.length > 0) {
      c.header('Retry-After', '2');
      return c.json({ ok: false, db: deps.dbKind, waiting }, 503);
    }
    const stats = deps.health && (await callerOwnsAStudy(deps, c.req.header('cookie'))) ? deps.health() : {};
    return c.json({ ok: true, db: deps.dbKind, ...stats });
  });
}

async function callerOwnsAStudy(deps: AppDeps, cookie: string | undefined): Promise<boolean> {
  const token = readSessionToken(cookie);
  // extend: false — a health probe is not use of the session.
  const session = token ? await deps.sessions.validate(token, { extend: false }) : null;
  if (!session) return false;
  const rows = await deps.db
    .select({ one: memberships.studyId })
    .from(memberships)
    .where(and(eq(memberships.userId, session.user.id), eq(memberships.role, 'owner')))
    .limit(1);
  return rows.length > 0;
}
