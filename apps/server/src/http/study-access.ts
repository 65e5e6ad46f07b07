/** The caller's role in the study named by the path, with the role table applied. */
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
