/** GET /api/studies/:studyId/audit — the study's access and change log, newest first (owner, lead). */
import { auditLog, users } from '@gloss/db';
import { and, desc, eq, lt } from 'drizzle-orm';
import { Hono } from 'hono';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { studyRole } from './study-access.js';

const MAX_LIMIT = 500;

function intQuery(raw: string | undefined, name: string, fallback: number, max: number): number {
  if (raw === undefined) return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > max) throw new HttpError(400, 'bad_request', `${name} must be an integer from 1 to ${max}.`);
  return n;
}

export function auditRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));
  app.get('/', async (c) => {
    const { studyId } = await studyRole(deps, c, 'audit.view');
    const limit = intQuery(c.req.query('limit'), 'limit', 100, MAX_LIMIT);
    const before = c.req.query('before');
    const rows = await deps.db
      .select({ entry: auditLog, userName: users.name })
      .from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.userId))
      .where(and(eq(auditLog.studyId, studyId), before === undefined ? undefined : lt(auditLog.id, intQuery(before, 'before', 0, Number.MAX_SAFE_INTEGER))))
      .orderBy(desc(auditLog.id))
      .limit(limit);
    return c.json(
      rows.map(({ entry, userName }) => ({
        id: entry.id,
        at: entry.at.toISOString(),
        userId: entry.userId,
        userName,
        action: entry.action,
        target: entry.target,
        detail: entry.detail ?? null,
      })),
    );
  });
  return app;
}
