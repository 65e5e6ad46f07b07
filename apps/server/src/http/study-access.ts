/** The caller's role in the study named by the path, with the role table applied. */
import { texts } from '@gloss/db';
import { eq } from 'drizzle-orm';
import type { Context } from 'hono';
import { can, documentAccess, type Action, type DocSupervision } from '../access/policy.js';
import { supervisionFor } from '../access/supervision.js';
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
 * Resolves `:textId` and the caller's role in its study; an unknown text, a non-member and a trainee
 * the text is not assigned to all get 404, so text ids are not probed either.
 */
export async function textRole(deps: AppDeps, c: Context<AppEnv>): Promise<{ text: typeof texts.$inferSelect; me: string; role: Role; supervision: DocSupervision }> {
  return textRoleOf(deps, idParam(c, 'textId', 'Text'), c.get('session').user.id);
}

export async function textRoleOf(deps: AppDeps, textId: string, me: string): Promise<{ text: typeof texts.$inferSelect; me: string; role: Role; supervision: DocSupervision }> {
  const [text] = await deps.db.select().from(texts).where(eq(texts.id, textId));
  if (!text) throw notFound('Text');
  const role = await roleIn(deps.db, text.studyId, me);
  if (!role) throw notFound('Text');
  const supervision = await supervisionFor(deps.db, text.id, me);
  // The one rule (policy.ts): a trainee reads only their assigned texts; rounds do not hide a text itself.
  if (!documentAccess(role, { kind: 'text', coderId: null }, me, { openRound: null, layerRound: null }, supervision).read) throw notFound('Text');
  return { text, me, role, supervision };
}
