/** GET /api/health: the database answers, and which kind it is. */
import { sql } from 'drizzle-orm';
import { Hono } from 'hono';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';

export function healthRoutes(deps: AppDeps) {
  return new Hono<AppEnv>().get('/health', async (c) => {
    try {
      await deps.db.execute(sql`select 1`);
    } catch {
      throw new HttpError(503, 'internal', 'The database does not answer.');
    }
    return c.json({ ok: true, db: deps.dbKind, ...(deps.health?.() ?? {}) });
  });
}
