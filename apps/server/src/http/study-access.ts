/** The caller's role in the study named by the path, with the role table applied. */
import { texts } from '@gloss/db';
import { eq } from 'drizzle-orm';
import type { Context } from 'hono';
import { can, type Action } from '../access/policy.js';
import { roleIn } from '../access/membership.js';
import { forbidden, notFound } from '../errors.js';
import type { Role } from '../sync/contracts.js';
import type { AppDeps, AppEnv } from './context.js';
import { idParam } from './validate.js';

/**
 * Resolves `:studyId`, requiring membership (non-members get 404, so study ids are not probed) and,
 * when given, permission for `action` (403).
 */
export async function studyRole(deps: AppDeps, c: Context<AppEnv>, action?: Action): Promise<{ studyId: string; role: Role }> {
  const studyId = idParam(c, 'studyId', 'Study');
  const role = await roleIn(deps.db, studyId, c.get('session').user.id);
  if (!role) throw notFound('Study');
  if (action && !can(role, action)) throw forbidden();
  return { studyId, role };
}

/**
 * Resolves `:textId` and the caller's role in its study; an unknown text and a non-member both get
 * 404, so text ids are not probed either.
 */
export async function textRole(deps: AppDeps, c: Context<AppEnv>): Promise<{ text: typeof texts.$inferSelect; me: string; role: Role }> {
  const textId = idParam(c, 'textId', 'Text');
  const [text] = await deps.db.select().from(texts).where(eq(texts.id, textId));
  if (!text) throw notFound('Text');
  const me = c.get('session').user.id;
  const role = await roleIn(deps.db, text.studyId, me);
  if (!role) throw notFound('Text');
  return { text, me, role };
}
