/**
 * /api/studies/:studyId/members — list (any member), add/change/remove (owner and lead; owners only by owners).
 * Adding by email never tells whether the email has an account on this server (issue 13): a current
 * member's role changes (the list shows them anyway); anyone else gets an invitation link (202), the
 * same answer and the same work whether or not an account exists — the link works for both.
 */
import { memberships, users } from '@gloss/db';
import { and, asc, eq } from 'drizzle-orm';
import { Hono } from 'hono';
import { canAssignRole } from '../access/policy.js';
import { roleIn } from '../access/membership.js';
import { addMember, removeMember } from '../admin/studies.js';
import { normaliseEmail } from '../admin/users.js';
import { createInvitation, createResetLink } from '../admin/account-links.js';
import { invitePath, resetPath } from './invitations.js';
import { forbidden, notFound } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { AddMemberBody, ChangeRoleBody } from './schemas.js';
import { studyRole } from './study-access.js';
import { idParam, readJson } from './validate.js';

export function memberRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  const list = async (studyId: string) =>
    deps.db
      .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.studyId, studyId))
      .orderBy(asc(users.name));

  app.get('/', async (c) => {
    const { studyId } = await studyRole(deps, c, 'members.read');
    return c.json(await list(studyId));
  });

  app.post('/', async (c) => {
    const { studyId, role: actor } = await studyRole(deps, c, 'members.manage');
    const body = await readJson(c, AddMemberBody);
    if (!canAssignRole(actor, body.role)) throw forbidden('Only an owner may make someone an owner.');
    const [member] = await list(studyId).then((all) => all.filter((m) => m.email === normaliseEmail(body.email)));
    if (member) {
      if (!canAssignRole(actor, member.role)) throw forbidden('Only an owner may change an owner’s role.');
      await addMember(deps.db, studyId, member.userId, body.role, c.get('session').user.id);
      await deps.liveAccess.changed({ studyId, userId: member.userId });
      return c.json({ ...member, role: body.role }, 200);
    }
    const { token, link } = await createInvitation(deps.db, { studyId, email: body.email, role: body.role, createdBy: c.get('session').user.id });
    return c.json({ invited: true, id: link.id, email: link.email, role: link.role, expiresAt: link.expiresAt.toISOString(), token, path: invitePath(token) }, 202);
  });

  app.patch('/:userId', async (c) => {
    const { studyId, role: actor } = await studyRole(deps, c, 'members.manage');
    const userId = idParam(c, 'userId', 'Member');
    const body = await readJson(c, ChangeRoleBody);
    const current = await roleIn(deps.db, studyId, userId);
    if (!current) throw notFound('Member');
    if (!canAssignRole(actor, current) || !canAssignRole(actor, body.role)) throw forbidden('Only an owner may grant or take away the owner role.');
    await addMember(deps.db, studyId, userId, body.role, c.get('session').user.id);
    // Their open connections follow the new role at once (a coder made observer can no longer write).
    await deps.liveAccess.changed({ studyId, userId });
    const [row] = await list(studyId).then((all) => all.filter((m) => m.userId === userId));
    return c.json(row);
  });

  app.post('/:userId/reset-link', async (c) => {
    const { studyId } = await studyRole(deps, c, 'members.resetPassword');
    const userId = idParam(c, 'userId', 'Member');
    const [member] = await list(studyId).then((all) => all.filter((m) => m.userId === userId));
    if (!member) throw notFound('Member');
    const { token, link } = await createResetLink(deps.db, { userId, email: member.email, studyId, createdBy: c.get('session').user.id });
    return c.json({ email: member.email, expiresAt: link.expiresAt.toISOString(), token, path: resetPath(token) }, 201);
  });

  app.delete('/:userId', async (c) => {
    const { studyId, role: actor } = await studyRole(deps, c, 'members.manage');
    const userId = idParam(c, 'userId', 'Member');
    const current = await roleIn(deps.db, studyId, userId);
    if (!current) throw notFound('Member');
    if (!canAssignRole(actor, current)) throw forbidden('Only an owner may remove an owner.');
    await removeMember(deps.db, studyId, userId, c.get('session').user.id);
    // Their open connections to this study's documents close now, not at their next reconnect.
    await deps.liveAccess.changed({ studyId, userId });
    return c.body(null, 204);
  });

  return app;
}
