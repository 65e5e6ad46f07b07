/** GET /api/studies/:studyId/audit — the study's access and change log, newest first (owner, lead), with filters. */
import { auditLog, users } from '@gloss/db';
import { type SQL, and, desc, eq, gte, like, lt } from 'drizzle-orm';
import { isUuid } from '../ids.js';
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

function instant(raw: string, name: string): Date {
  const d = new Date(raw);
  if (Number.isNaN(d.getTime())) throw new HttpError(400, 'bad_request', `${name} must be a date or date-time (ISO 8601), got "${raw}".`);
  return d;
}

/**
 * Optional filters: `action` exact (`member.invite`) or a family ending in a dot (`member.`), `userId`
 * (who acted), `from` and `to` (inclusive bounds on the time).
 */
function auditFilters(action?: string, userId?: string, from?: string, to?: string): SQL[] {
  const out: SQL[] = [];
  if (action) {
    if (!/^[a-z_.]{1,64}$/.test(action)) throw new HttpError(400, 'bad_request', 'action: letters, dots and underscores only.');
    out.push(action.endsWith('.') ? like(auditLog.action, `${action}%`) : eq(auditLog.action, action));
  }
  if (userId) {
    if (!isUuid(userId)) throw new HttpError(400, 'bad_request', 'userId must be a uuid.');
    out.push(eq(auditLog.userId, userId.toLowerCase()));
  }
  if (from) out.push(gte(auditLog.at, instant(from, 'from')));
  // Stored times have microseconds; an ISO time has milliseconds: `to` covers its whole millisecond.
  if (to) out.push(lt(auditLog.at, new Date(instant(to, 'to').getTime() + 1)));
  return out;
}

export function auditRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));
  app.get('/', async (c) => {
    const { studyId } = await studyRole(deps, c, 'audit.view');
    const limit = intQuery(c.req.query('limit'), 'limit', 100, MAX_LIMIT);
    const before = c.req.query('before');
    const filters = auditFilters(c.req.query('action'), c.req.query('userId'), c.req.query('from'), c.req.query('to'));
    const rows = await deps.db
      .select({ entry: auditLog, userName: users.name })
      .from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.userId))
      .where(and(eq(auditLog.studyId, studyId), before === undefined ? undefined : lt(auditLog.id, intQuery(before, 'before', 0, Number.MAX_SAFE_INTEGER)), ...filters))
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
