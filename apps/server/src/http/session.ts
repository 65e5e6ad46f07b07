/** POST /api/session (sign in), DELETE /api/session (sign out), GET /api/me. */
import { Hono, type Context } from 'hono';
import { clearedSessionCookie, readSessionToken, sessionCookie } from '../auth/cookies.js';
import { sessionIdFromToken } from '../auth/tokens.js';
import { spendVerifyTime, verifyPassword } from '../auth/passwords.js';
import { findUserByEmail, normaliseEmail } from '../admin/users.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { clientAddress, isSecure, requireSession, tooMany } from './middleware.js';
import { SignInBody } from './schemas.js';
import { ChangePasswordBody, changeOwnPassword } from './account-links.js';
import { readJson } from './validate.js';

const WRONG = 'Email or password is wrong.';

/**
 * Signs this browser in as `userId` (sign-in, first run, an accepted invitation). A new session
 * replaces whatever session this browser held, so no session outlives its cookie.
 */
export async function beginSession(deps: AppDeps, c: Context<AppEnv>, userId: string): Promise<Date> {
  const previous = readSessionToken(c.req.header('cookie'));
  if (previous) await endSession(deps, previous);
  const { token, expiresAt } = await deps.sessions.create(userId);
  c.header('Set-Cookie', sessionCookie(token, expiresAt, isSecure(c, deps.config.publicUrl)));
  return expiresAt;
}

export function sessionRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();

  app.post('/session', async (c) => {
    const body = await readJson(c, SignInBody);
    const email = normaliseEmail(body.email);
    const address = clientAddress(c, deps.config.trustProxy);
    const pair = `signin|${email}|${address}`;
    // Checked and recorded in one step, before any await (auth/rate-limit.ts); refunded on success.
    const begun = deps.signInLimiter.begin([
      { key: pair, max: deps.config.signInMaxFailures },
      { key: `signin-email|${email}`, max: deps.config.signInMaxFailuresPerEmail },
      { key: `signin-address|${address}`, max: deps.config.signInMaxFailuresPerAddress },
    ]);
    if (!begun.allowed) throw tooMany(begun, 'sign-ins');
    // One argon2 verification whether or not the email has an account: same cost on every path.
    const user = await findUserByEmail(deps.db, email);
    const ok = user ? await verifyPassword(user.passwordHash, body.password) : (await spendVerifyTime(body.password), false);
    if (!user || !ok) throw new HttpError(401, 'invalid_credentials', WRONG);
    begun.succeeded([pair]);
    const expiresAt = await beginSession(deps, c, user.id);
    return c.json({ id: user.id, email: user.email, name: user.name, expiresAt: expiresAt.toISOString() });
  });

  app.delete('/session', async (c) => {
    const token = readSessionToken(c.req.header('cookie'));
    if (token) await endSession(deps, token);
    c.header('Set-Cookie', clearedSessionCookie(isSecure(c, deps.config.publicUrl)));
    return c.body(null, 204);
  });

  app.put('/me/password', requireSession(deps), async (c) => {
    const body = await readJson(c, ChangePasswordBody);
    const { user, sessionId } = c.get('session');
    await changeOwnPassword(deps, user.id, sessionId, body);
    return c.body(null, 204);
  });

  app.get('/me', requireSession(deps), (c) => {
    const { user, expiresAt } = c.get('session');
    return c.json({ id: user.id, email: user.email, name: user.name, sessionExpiresAt: expiresAt.toISOString() });
  });

  return app;
}

/** Ends a session and closes its open sync connections on every node (the same person's other sessions stay). */
async function endSession(deps: AppDeps, token: string): Promise<void> {
  await deps.sessions.invalidate(token);
  await deps.liveAccess.changed({ sessionId: sessionIdFromToken(token) });
}
