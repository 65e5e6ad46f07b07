/** /api/studies/:studyId/members — list (any member), add/change/remove (owner and lead; owners only by owners). */
import { memberships, users } from '@gloss/db';
import { and, asc, eq } from 'drizzle-orm';
import { Hono } from 'hono';
import { canAssignRole } from '../access/policy.js';
import { roleIn } from '../access/membership.js';
import { addMember, removeMember } from '../admin/studies.js';
import { findUserByEmail } from '../admin/users.js';
import { createResetLink } from '../admin/account-links.js';
import { resetPath } from './invitations.js';
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
    const user = await findUserByEmail(deps.db, body.email);
    if (!user) throw notFound(`An account with the email ${body.email}`);
    const current = await roleIn(deps.db, studyId, user.id);
    if (current && !canAssignRole(actor, current)) throw forbidden('Only an owner may change an owner’s role.');
    await addMember(deps.db, studyId, user.id, body.role, c.get('session').user.id);
    if (current) await deps.liveAccess.changed({ studyId, userId: user.id });
    return c.json({ userId: user.id, name: user.name, email: user.email, role: body.role }, current ? 200 : 201);
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
