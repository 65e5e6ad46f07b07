/**
 * The links people follow, without being signed in:
 * GET  /api/invitations/:token          → {email, role, studyId, studyTitle, expiresAt, accountExists}
 * POST /api/invitations/:token/accept   {name, password} — a new account, or {password} of the existing
 *                                        account with that email; joins the study and signs in (200).
 * GET  /api/password-resets/:token      → {email, expiresAt}
 * POST /api/password-resets/:token      {password} — sets it and ends every session of the account (204).
 * Unknown tokens are 404; used or expired links 410 (`link_used`, `link_expired`). Each works once.
 */
import { type Db, memberships, users } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import { Hono } from 'hono';
import { z } from 'zod';
import { findLink, spendLink, studyTitle } from '../admin/account-links.js';
import { recordAudit } from '../admin/audit.js';
import { createUser, findUserByEmail, setPassword } from '../admin/users.js';
import { spendVerifyTime, verifyPassword } from '../auth/passwords.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { clientAddress, tooMany } from './middleware.js';
import { beginSession } from './session.js';
import { readJson } from './validate.js';

export const AcceptInvitationBody = z.object({ name: z.string().trim().min(1).max(200).optional(), password: z.string().min(1).max(1024) });
export const ResetPasswordBody = z.object({ password: z.string().min(1).max(1024) });

export function accountLinkRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();

  app.get('/invitations/:token', async (c) => {
    const link = await findLink(deps.db, c.req.param('token'), 'invite');
    const existing = await findUserByEmail(deps.db, link.email);
    return c.json({
      email: link.email,
      role: link.role,
      studyId: link.studyId,
      studyTitle: await studyTitle(deps.db, link.studyId!),
      expiresAt: link.expiresAt.toISOString(),
      accountExists: existing !== null,
    });
  });

  app.post('/invitations/:token/accept', async (c) => {
    const token = c.req.param('token');
    const body = await readJson(c, AcceptInvitationBody);
    // Guessing the password of an existing account through an invitation counts like a failed sign-in.
    const begun = deps.signInLimiter.begin([{ key: `invite|${clientAddress(c, deps.config.trustProxy)}`, max: deps.config.signInMaxFailures }]);
    if (!begun.allowed) throw tooMany(begun, 'attempts');
    const joined = async () => {
      const link = await findLink(deps.db, token, 'invite');
      const existing = await findUserByEmail(deps.db, link.email);
      if (existing) {
        if (!(await verifyPassword(existing.passwordHash, body.password))) {
          throw new HttpError(401, 'invalid_credentials', `An account with ${link.email} exists already: enter its password to join.`);
        }
      } else {
        if (!body.name) throw new HttpError(400, 'invalid_body', 'name: say what others in the study should call you.');
        await spendVerifyTime(body.password);
      }
      const user = await deps.db.transaction(async (tx) => {
        const t = tx as unknown as Db;
        await spendLink(t, link);
        const u = existing ?? (await createUser(t, { email: link.email, name: body.name!, password: body.password }));
        // Someone already in the study keeps their role: an invitation adds people, it does not demote them.
        await t.insert(memberships).values({ studyId: link.studyId!, userId: u.id, role: link.role! }).onConflictDoNothing();
        await recordAudit(t, { userId: u.id, studyId: link.studyId, action: 'member.join', target: u.id, detail: { role: link.role, invitation: link.id } });
        return u;
      });
      return { user, link };
    };
    // Only a wrong password counts against the limit; other refusals (a used link, a missing name) are refunded.
    const { user, link } = await joined().catch((err: unknown) => {
      if (!(err instanceof HttpError && err.code === 'invalid_credentials')) begun.succeeded();
      throw err;
    });
    begun.succeeded();
    const expiresAt = await beginSession(deps, c, user.id);
    const [membership] = await deps.db
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.studyId, link.studyId!), eq(memberships.userId, user.id)));
    return c.json({ id: user.id, email: user.email, name: user.name, studyId: link.studyId, role: membership?.role ?? link.role, expiresAt: expiresAt.toISOString() });
  });

  app.get('/password-resets/:token', async (c) => {
    const link = await findLink(deps.db, c.req.param('token'), 'reset');
    return c.json({ email: link.email, expiresAt: link.expiresAt.toISOString() });
  });

  app.post('/password-resets/:token', async (c) => {
    const link = await findLink(deps.db, c.req.param('token'), 'reset');
    const { password } = await readJson(c, ResetPasswordBody);
    await deps.db.transaction(async (tx) => {
      const t = tx as unknown as Db;
      await spendLink(t, link);
      await setPassword(t, link.userId!, password);
      await recordAudit(t, { userId: link.userId, studyId: link.studyId, action: 'account.reset', target: link.userId });
    });
    // Every session of the account ended: its open connections close at once.
    await deps.liveAccess.changed({ userId: link.userId! });
    return c.body(null, 204);
  });

  return app;
}

/** PUT /api/me/password {currentPassword, newPassword} — ends this account's other sessions (204). */
export const ChangePasswordBody = z.object({ currentPassword: z.string().min(1).max(1024), newPassword: z.string().min(1).max(1024) });

export async function changeOwnPassword(deps: AppDeps, userId: string, sessionId: string, body: z.infer<typeof ChangePasswordBody>): Promise<void> {
  const [row] = await deps.db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
  if (!row || !(await verifyPassword(row.passwordHash, body.currentPassword))) {
    throw new HttpError(403, 'invalid_credentials', 'The current password is wrong; nothing was changed.');
  }
  await setPassword(deps.db, userId, body.newPassword, sessionId);
  await recordAudit(deps.db, { userId, studyId: null, action: 'account.password', target: userId });
  await deps.liveAccess.changed({ userId });
}
