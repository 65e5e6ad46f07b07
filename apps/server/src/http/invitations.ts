/**
 * /api/studies/:studyId/invitations — owners and leads make single-use, expiring links that invite
 * someone by email with a role (POST → 201 {id, email, role, expiresAt, token, path}); list the ones
 * not yet used (GET); withdraw one (DELETE /:id → 204). Only an owner may invite an owner. The link
 * is shown once, to be copied and sent by the inviter's own means (Gloss sends no mail).
 */
import { Hono } from 'hono';
import { z } from 'zod';
import { canAssignRole } from '../access/policy.js';
import { createInvitation, pendingInvitations, revokeInvitation } from '../admin/account-links.js';
import { forbidden } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { RoleSchema } from './schemas.js';
import { studyRole } from './study-access.js';
import { idParam, readJson } from './validate.js';

export const NewInvitationBody = z.object({ email: z.string().trim().min(3).max(320), role: RoleSchema });

export const invitePath = (token: string) => `/#/invite/${token}`;
export const resetPath = (token: string) => `/#/reset/${token}`;

export function invitationRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.post('/', async (c) => {
    const { studyId, role: actor } = await studyRole(deps, c, 'members.manage');
    const body = await readJson(c, NewInvitationBody);
    if (!canAssignRole(actor, body.role)) throw forbidden('Only an owner may invite someone as an owner.');
    const { token, link } = await createInvitation(deps.db, { studyId, email: body.email, role: body.role, createdBy: c.get('session').user.id });
    return c.json({ id: link.id, email: link.email, role: link.role, expiresAt: link.expiresAt.toISOString(), token, path: invitePath(token) }, 201);
  });

  app.get('/', async (c) => {
    const { studyId } = await studyRole(deps, c, 'members.manage');
    const rows = await pendingInvitations(deps.db, studyId);
    const now = Date.now();
    return c.json(rows.map((r) => ({ id: r.id, email: r.email, role: r.role, createdAt: r.createdAt.toISOString(), expiresAt: r.expiresAt.toISOString(), expired: r.expiresAt.getTime() <= now })));
  });

  app.delete('/:invitationId', async (c) => {
    const { studyId } = await studyRole(deps, c, 'members.manage');
    await revokeInvitation(deps.db, studyId, idParam(c, 'invitationId', 'Invitation'), c.get('session').user.id);
    return c.body(null, 204);
  });

  return app;
}
